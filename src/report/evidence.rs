//! Evidence sentences as the page lists them, in the graph's edge panels and wherever else a
//! relation shows its sentences. A module of its own so that the parts of the page share it
//! without depending on each other.

use crate::query::EvidenceLine;
use maud::{html, Markup};

/// Evidence sentences with their place, cue and reading.
pub(super) fn evidence_list(ev: &[EvidenceLine]) -> Markup {
    html! {
        ol.evidence {
            @for e in ev {
                li {
                    span.loc { (e.location) } " "
                    span.tag { "[" (e.polarity) ", " (e.modality) "; cue " (e.cue) "]" }
                    blockquote { (e.sentence) }
                }
            }
        }
    }
}
