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
                    span.loc { (shown(&e.location)) } " "
                    span.tag { "[" (e.polarity) ", " (e.modality) "; cue " (e.cue) "]" }
                    blockquote { (shown(&e.sentence)) }
                }
            }
        }
    }
}

/// Text from the corpus (a sentence, a file name, a record id) as the page shows it. maud
/// escapes markup, so `<script>` in a sentence is only ever text; control characters it lets
/// through, yet they are not allowed in HTML text (the HTML standard calls them a parse error)
/// and reach a terminal raw when the page is printed to one. Each becomes U+FFFD, visibly, as
/// on the command line; line breaks and tabs stay, being white space to HTML.
pub(super) fn shown(s: &str) -> String {
    s.chars()
        .map(|c| {
            if (c.is_control() && c != '\n' && c != '\t')
                || matches!(c, '\u{202A}'..='\u{202E}' | '\u{2066}'..='\u{2069}')
            {
                '\u{FFFD}'
            } else {
                c
            }
        })
        .collect()
}
