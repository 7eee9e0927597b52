//! Loading a comparison: the answers file, the question set it refers to, and the mention
//! index of every variable it asks about. `compare` and `report --compare` load it the same way.

use super::answers::{asked, read_answers, Answer, AnswerContext, Asked};
use super::profile::Corpus;
use super::questions::{questions, read_pairs, PairList, Wording};
use crate::error::{InputError, StoreError};
use crate::query::{Loaded, MentionIndex};
use crate::variables::Normalizer;
use std::path::Path;

/// The answers file and the question set it refers to.
pub struct AnswerSource<'a> {
    pub answers: &'a Path,
    /// The variable or pair list the questions were made from, to look up rows that give only
    /// an id.
    pub list: Option<PairList<'a>>,
    /// The wordings the questions were made with.
    pub wordings: &'a [Wording],
}

/// A model's answers, and the distinct questions they answer in first-answer order.
pub struct AnswerSet {
    pub answers: Vec<Answer>,
    pub asked: Vec<Asked>,
}

impl AnswerSet {
    /// Read the question set (when a list is given), then the answers file, and resolve every
    /// answer to its question.
    pub fn read(normalizer: &Normalizer, src: &AnswerSource<'_>) -> Result<AnswerSet, InputError> {
        let questions = match src.list {
            Some(list) => questions(&read_pairs(normalizer, list)?, src.wordings, true),
            None => Vec::new(),
        };
        let text = std::fs::read_to_string(src.answers).map_err(|source| InputError::Io {
            path: src.answers.to_path_buf(),
            source,
        })?;
        let cx = AnswerContext {
            normalizer,
            wordings: src.wordings,
            questions: &questions,
        };
        let answers = read_answers(src.answers, &text, &cx)?;
        let asked = asked(&answers);
        Ok(AnswerSet { answers, asked })
    }

    /// The sentences naming each variable the questions ask about (after aliases), with one
    /// index query per variable.
    pub fn mentions(&self, loaded: &mut Loaded) -> Result<MentionIndex, StoreError> {
        let keys: Vec<String> = self
            .asked
            .iter()
            .flat_map(|q| [&q.x_key, &q.y_key])
            .map(|k| loaded.aliases.resolve(k).to_string())
            .collect();
        MentionIndex::build(&mut loaded.store, keys.iter().map(String::as_str))
    }
}

impl<'a> Corpus<'a> {
    /// The corpus of a loaded store, with the mention index of the questions' variables.
    pub fn of(loaded: &'a Loaded, mentions: &'a MentionIndex) -> Corpus<'a> {
        Corpus {
            graph: &loaded.graph,
            aliases: &loaded.aliases,
            mentions,
            sentences: loaded.store.manifest.totals().1,
        }
    }
}
