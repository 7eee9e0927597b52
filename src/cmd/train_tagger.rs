//! `hearsay train-tagger`: train the part-of-speech tagger from CoNLL-U treebanks, reproducibly.

use super::Global;
use anyhow::{Context, Result};
use clap::Args;
use hearsay::extract::{
    read_conllu, tagger_accuracy, train_tagger, Tagger, TaggerTrainOptions as TrainOptions,
    TreebankSentence,
};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Defaults reproduce patterns/tagger.model: UD English-EWT train plus the GUM \
documents under ../shared/data/pos-treebank, 8 iterations, seed 1, weights under 0.5 pruned. \
The model inherits the training data's licences (see patterns/tagger.NOTICE)."
)]
pub struct TrainTaggerArgs {
    /// Where to write the model.
    #[arg(long, value_name = "FILE", default_value = "patterns/tagger.model")]
    pub out: PathBuf,
    /// CoNLL-U training files or folders (every .conllu inside).
    #[arg(
        long = "train",
        value_name = "PATH",
        default_values = ["../shared/data/pos-treebank/ud-english-ewt/en_ewt-ud-train.conllu", "../shared/data/pos-treebank/gum"]
    )]
    pub train: Vec<PathBuf>,
    /// A held-out CoNLL-U file whose accuracy is printed after training.
    #[arg(
        long,
        value_name = "FILE",
        default_value = "../shared/data/pos-treebank/ud-english-ewt/en_ewt-ud-dev.conllu"
    )]
    pub dev: PathBuf,
    /// Training passes over the data.
    #[arg(long, default_value_t = 8)]
    pub iterations: usize,
    /// Weights smaller than this (in absolute value) are dropped from the saved model.
    #[arg(long, default_value_t = 0.5)]
    pub prune: f32,
}

fn conllu_files(p: &Path) -> Result<Vec<PathBuf>> {
    if !p.is_dir() {
        return Ok(vec![p.to_path_buf()]);
    }
    let mut v: Vec<PathBuf> = std::fs::read_dir(p)
        .with_context(|| format!("cannot read {}", p.display()))?
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|q| q.extension().is_some_and(|x| x == "conllu"))
        .collect();
    v.sort();
    Ok(v)
}

fn read(p: &Path) -> Result<Vec<TreebankSentence>> {
    let text =
        std::fs::read_to_string(p).with_context(|| format!("cannot read {}", p.display()))?;
    Ok(read_conllu(&text))
}

pub fn run(_g: &Global, a: &TrainTaggerArgs) -> Result<ExitCode> {
    let mut data = Vec::new();
    for p in &a.train {
        for f in conllu_files(p)? {
            data.extend(read(&f)?);
        }
    }
    let tokens: usize = data.iter().map(Vec::len).sum();
    eprintln!("training on {} sentences, {tokens} tokens", data.len());
    let opts = TrainOptions {
        iterations: a.iterations,
        ..TrainOptions::default()
    };
    let t = train_tagger(&data, opts, |i, acc| {
        eprintln!("iteration {i}: training accuracy {acc:.4}")
    });
    let model = t.to_model(a.prune);
    std::fs::write(&a.out, &model).with_context(|| format!("cannot write {}", a.out.display()))?;
    // Measure the model as saved (pruned and rounded), not the one in memory.
    let saved = Tagger::from_model(&model)?;
    let dev = read(&a.dev)?;
    eprintln!(
        "wrote {} ({} bytes); accuracy on {}: {:.4}",
        a.out.display(),
        model.len(),
        a.dev.display(),
        tagger_accuracy(&saved, &dev)
    );
    Ok(ExitCode::SUCCESS)
}
