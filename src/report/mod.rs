//! The HTML report: one self-contained page (styles, script and figures inlined, no URL to
//! anything outside it) that people can open offline and pass on.
//!
//! The work is split in two steps so that each can be tested alone: [`collect`] gathers every
//! number and evidence sentence the page shows into a plain [`Report`] value, and [`render`]
//! turns that value into HTML with maud, which escapes every piece of text it is given. Corpus
//! text therefore reaches the page only as escaped text nodes or attribute values; the inlined
//! script is a constant and reads nothing but the page's own elements.
//!
//! `collect` takes its data through the query face, once, from a [`Loaded`](crate::query::Loaded)
//! store: the top relations, conflicts, co-mentions, pair report and evidence are the ones the
//! `top`, `conflicts`, `pair` and `compare` commands print, counted by the same functions. The
//! model comparison comes in ready-made from [`crate::compare`]. Everything after that is layout
//! and markup: `layout` places the picture's nodes, `graph_svg` draws the picture and its
//! evidence panels, `plots` the plots, `page` the rest, and `evidence` the evidence lists they
//! share.
//!
//! The public face: [`collect`] with its [`Sources`] and [`Options`], the [`Report`] value and its
//! parts, and [`render`].
//!
//! Architecture invariant: the report reads no store and no file itself, and renders nothing it
//! did not collect.

mod collect;
mod data;
mod evidence;
mod graph_svg;
mod layout;
mod page;
mod plots;

pub use collect::{collect, Sources};
pub use data::{BothWays, Options, PictureEdge, PictureNode, Report};
pub use layout::Point;
pub use page::render;
