//! Loading, validating and expanding the pattern files in `patterns/`.
//!
//! Everything hearsay knows about how English states cause and effect is data: cue entries
//! (`cues/*.toml`), the word lists used around a match (`lexicon.toml`) and irregular verb forms
//! (`irregular-verbs.tsv`). This module turns those files into checked, typed values and reports
//! any mistake as `file:line: reason`. It does no matching itself; `cues` compiles the result.
//!
//! The shipped files are compiled into the binary, so `hearsay` works from any directory;
//! `--patterns DIR` loads a user's folder with the same layout instead.//!
//! The public face is [`PatternSet`] (`PatternSet::load`: the built-in files or a folder), with
//! the typed values it holds: cue entries ([`CueSpec`], their [`PatternToken`]s and [`Role`]s)
//! and the [`Lexicon`]. `set` loads a folder and fingerprints it, `cues` parses and checks cue
//! files and pattern strings, `inflection` expands `word~` into verb forms, `lexicon` reads the
//! word lists and alias files.

mod cues;
mod inflection;
mod lexicon;
mod set;
#[cfg(test)]
mod tests;

pub use cues::{CueSpec, Example, PatternToken, Role};
pub use lexicon::{load_aliases, Lexicon, Senses, WordSet};
pub use set::{PatternSet, BUILTIN_CONFIDENCE};

use crate::error::InputError;
use std::path::Path;

fn invalid(path: &Path, line: usize, message: impl Into<String>) -> InputError {
    InputError::Invalid {
        path: path.to_path_buf(),
        line,
        message: message.into(),
    }
}

pub(crate) fn line_of(text: &str, offset: usize) -> usize {
    text[..offset.min(text.len())]
        .bytes()
        .filter(|&b| b == b'\n')
        .count()
        + 1
}
