//! The report's plots as inline SVG with labelled axes: support per edge (log₂ bins), direction
//! share against total support for pairs stated both ways (log x), and claims by cue family.
//!
//! Each plot is a `<figure>` with an SVG `<title>`/`<desc>` and a collapsible table of the same
//! numbers, which is the text alternative.

use super::data::Report;
use maud::{html, Markup};

const PW: f64 = 600.0;
const PH: f64 = 340.0;
const LEFT: f64 = 70.0;
const RIGHT: f64 = 20.0;
const TOP: f64 = 20.0;
const BOTTOM: f64 = 56.0;

fn iw() -> f64 {
    PW - LEFT - RIGHT
}
fn ih() -> f64 {
    PH - TOP - BOTTOM
}

struct Axes<'a> {
    id: &'a str,
    title: &'a str,
    desc: String,
    x_label: &'a str,
    y_label: &'a str,
    /// (position in [0, 1] along the axis, label).
    x_ticks: Vec<(f64, String)>,
    y_ticks: Vec<(f64, String)>,
}

fn frame(a: Axes<'_>, body: Markup) -> Markup {
    let (x0, y0) = (LEFT, TOP + ih());
    html! {
        svg.plot #(a.id) viewBox=(format!("0 0 {PW} {PH}")) width="100%" role="img"
            aria-labelledby=(format!("{0}-title {0}-desc", a.id)) {
            title #(format!("{}-title", a.id)) { (a.title) }
            desc #(format!("{}-desc", a.id)) { (a.desc) }
            g.grid {
                @for (p, _) in &a.y_ticks {
                    line x1=(LEFT) x2=(LEFT + iw()) y1=(fmt(y0 - p * ih())) y2=(fmt(y0 - p * ih())) {}
                }
            }
            g.body { (body) }
            g.axis {
                line x1=(x0) y1=(y0) x2=(x0 + iw()) y2=(y0) {}
                line x1=(x0) y1=(y0) x2=(x0) y2=(TOP) {}
                @for (p, l) in &a.x_ticks {
                    line x1=(fmt(x0 + p * iw())) x2=(fmt(x0 + p * iw())) y1=(y0) y2=(y0 + 5.0) {}
                    text x=(fmt(x0 + p * iw())) y=(y0 + 18.0) text-anchor="middle" { (l) }
                }
                @for (p, l) in &a.y_ticks {
                    line x1=(x0 - 5.0) x2=(x0) y1=(fmt(y0 - p * ih())) y2=(fmt(y0 - p * ih())) {}
                    text x=(x0 - 8.0) y=(fmt(y0 - p * ih() + 4.0)) text-anchor="end" { (l) }
                }
                text.label x=(fmt(x0 + iw() / 2.0)) y=(PH - 12.0) text-anchor="middle" { (a.x_label) }
                text.label transform=(format!("translate(16,{}) rotate(-90)", fmt(TOP + ih() / 2.0)))
                    text-anchor="middle" { (a.y_label) }
            }
        }
    }
}

fn fmt(v: f64) -> String {
    format!("{v:.1}")
}

/// About five round ticks from 0 to `max`.
fn linear_ticks(max: usize) -> (usize, Vec<(f64, String)>) {
    let step = (0..12)
        .flat_map(|e| [1usize, 2, 5].map(|m| m * 10usize.pow(e)))
        .find(|&s| s * 5 >= max.max(1))
        .unwrap_or(1);
    let top = max.max(1).div_ceil(step) * step;
    let ticks = (0..=top / step)
        .map(|i| ((i * step) as f64 / top as f64, (i * step).to_string()))
        .collect();
    (top, ticks)
}

/// Edges per log₂ bin of support: bin k holds supports 2^k ..= 2^(k+1) - 1 (support 0 in a bin
/// of its own).
pub fn support_bins(support: &[usize]) -> Vec<(String, usize)> {
    let max = support.iter().copied().max().unwrap_or(0);
    let mut bins: Vec<(String, usize)> = Vec::new();
    if support.contains(&0) {
        bins.push(("0".into(), 0));
    }
    let mut lo = 1usize;
    while lo <= max {
        let hi = lo * 2 - 1;
        bins.push((
            if lo == hi {
                lo.to_string()
            } else {
                format!("{lo}–{hi}")
            },
            0,
        ));
        lo *= 2;
    }
    let zero = usize::from(support.contains(&0));
    for &s in support {
        let k = if s == 0 {
            0
        } else {
            zero + (usize::BITS - 1 - s.leading_zeros()) as usize
        };
        bins[k].1 += 1;
    }
    bins
}

fn data_table(caption: &str, heads: [&str; 2], rows: &[(String, String)]) -> Markup {
    html! {
        details {
            summary { (caption) }
            table {
                thead { tr { th scope="col" { (heads[0]) } th scope="col" { (heads[1]) } } }
                tbody { @for (a, b) in rows { tr { td { (a) } td.num { (b) } } } }
            }
        }
    }
}

fn support_histogram(r: &Report) -> Markup {
    let bins = support_bins(&r.support_per_edge);
    let max = bins.iter().map(|b| b.1).max().unwrap_or(0);
    let (top, y_ticks) = linear_ticks(max);
    let n = bins.len().max(1) as f64;
    let bw = iw() / n;
    let x_ticks = bins
        .iter()
        .enumerate()
        .map(|(i, b)| ((i as f64 + 0.5) / n, b.0.clone()))
        .collect();
    let body = html! {
        @for (i, b) in bins.iter().enumerate() {
            @let h = b.1 as f64 / top as f64 * ih();
            rect.bar x=(fmt(LEFT + i as f64 * bw + bw * 0.1)) y=(fmt(TOP + ih() - h))
                width=(fmt(bw * 0.8)) height=(fmt(h)) {
                title { (format!("support {}: {} edges", b.0, b.1)) }
            }
        }
    };
    let one = r.support_per_edge.iter().filter(|&&s| s == 1).count();
    let desc = format!(
        "Bar chart of {} causal edges by support, in bins that double in width. {} edges \
         have support 1.",
        r.support_per_edge.len(),
        one
    );
    let rows: Vec<(String, String)> = bins
        .iter()
        .map(|b| (b.0.clone(), b.1.to_string()))
        .collect();
    html! {
        figure {
            (frame(Axes {
                id: "plot-support",
                title: "Support per edge",
                desc,
                x_label: "support: claims that state the edge (log₂ bins)",
                y_label: "causal edges",
                x_ticks,
                y_ticks,
            }, body))
            figcaption { "How many edges are stated once, a few times, many times: most edges are stated once, and a few are repeated across the corpus." }
            (data_table("The numbers", ["support", "edges"], &rows))
        }
    }
}

/// Log-scale ticks 1, 2, 5, 10, … up to `max`; positions are log10(v) / log10(top).
fn log_ticks(max: usize) -> (f64, Vec<(f64, String)>) {
    let mut vals = Vec::new();
    let mut e = 1usize;
    loop {
        for m in [1, 2, 5] {
            vals.push(m * e);
        }
        if 5 * e >= max.max(2) {
            break;
        }
        e *= 10;
    }
    let top = vals
        .iter()
        .copied()
        .find(|&v| v >= max.max(2))
        .unwrap_or(max.max(2));
    let lt = (top as f64).log10();
    let ticks = vals
        .into_iter()
        .filter(|&v| v <= top)
        .map(|v| ((v as f64).log10() / lt, v.to_string()))
        .collect();
    (lt, ticks)
}

fn direction_scatter(r: &Report) -> Markup {
    let max = r
        .both_ways
        .iter()
        .map(|b| b.total_support)
        .max()
        .unwrap_or(2);
    let (lt, x_ticks) = log_ticks(max);
    let y_ticks = (0..=5)
        .map(|i| (i as f64 / 5.0, format!("{:.1}", 0.5 + 0.1 * i as f64)))
        .collect();
    let body = html! {
        @for b in &r.both_ways {
            @let x = LEFT + (b.total_support.max(1) as f64).log10() / lt * iw();
            @let y = TOP + ih() - (b.major_share - 0.5) / 0.5 * ih();
            circle.point cx=(fmt(x)) cy=(fmt(y)) r="4" {
                title { (format!("{} → {}: {:.2} of {} claims", b.major.0, b.major.1, b.major_share, b.total_support)) }
            }
        }
    };
    let desc = format!(
        "Scatter plot of {} variable pairs stated in both directions: total support (log \
         scale) against the share that goes the more-stated way.",
        r.both_ways.len()
    );
    let rows: Vec<(String, String)> = r
        .both_ways
        .iter()
        .map(|b| {
            (
                format!(
                    "{} → {} (support {})",
                    b.major.0, b.major.1, b.total_support
                ),
                format!("{:.2}", b.major_share),
            )
        })
        .collect();
    html! {
        figure {
            (frame(Axes {
                id: "plot-direction",
                title: "Direction ratio of pairs stated both ways",
                desc,
                x_label: "total support, both directions (log scale)",
                y_label: "share in the more-stated direction",
                x_ticks,
                y_ticks,
            }, body))
            figcaption {
                "Pairs near 0.5 are stated about as often one way as the other; near 1.0 one direction dominates. "
                (r.both_ways.len()) " pairs."
            }
            (data_table("The numbers", ["pair (more-stated direction)", "share"], &rows))
        }
    }
}

fn family_bars(r: &Report) -> Markup {
    let total: usize = r.families.iter().map(|f| f.1).sum();
    let n = r.families.len().max(1) as f64;
    let bh = ih() / n;
    let share = |c: usize| c as f64 / total.max(1) as f64;
    let max = r.families.iter().map(|f| share(f.1)).fold(0.0, f64::max);
    // Room to the right of the longest bar for its label.
    let top = (((max + 0.25) * 10.0).ceil() / 10.0).clamp(0.1, 1.0);
    let steps = (top * 10.0).round() as usize;
    let x_ticks = (0..=steps)
        .map(|i| (i as f64 / steps as f64, format!("{}%", i * 10)))
        .collect();
    let body = html! {
        @for (i, (name, c)) in r.families.iter().enumerate() {
            @let w = share(*c) / top * iw();
            @let y = TOP + i as f64 * bh;
            rect.bar x=(LEFT) y=(fmt(y + bh * 0.15)) width=(fmt(w)) height=(fmt(bh * 0.7)) {
                title { (format!("{name}: {c} claims ({:.1}%)", 100.0 * share(*c))) }
            }
            text.barlabel x=(fmt(LEFT + w + 4.0)) y=(fmt(y + bh * 0.5 + 4.0)) {
                (format!("{name} ({:.0}%)", 100.0 * share(*c)))
            }
        }
    };
    let rows: Vec<(String, String)> = r
        .families
        .iter()
        .map(|(f, c)| (f.clone(), format!("{c} ({:.1}%)", 100.0 * share(*c))))
        .collect();
    html! {
        figure {
            (frame(Axes {
                id: "plot-families",
                title: "Claims by cue family",
                desc: format!("Horizontal bar chart: share of {total} claims by the family of the cue that found them."),
                x_label: "share of claims",
                y_label: "cue family",
                x_ticks,
                y_ticks: Vec::new(),
            }, body))
            figcaption { "Which kinds of wording the claims come from." }
            (data_table("The numbers", ["cue family", "claims"], &rows))
        }
    }
}

/// All three plots.
pub fn plots(r: &Report) -> Markup {
    html! {
        div.plots {
            (support_histogram(r))
            (direction_scatter(r))
            (family_bars(r))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn support_bins_double_in_width() {
        let b = support_bins(&[1, 1, 2, 3, 4, 9, 0]);
        let labels: Vec<&str> = b.iter().map(|x| x.0.as_str()).collect();
        assert_eq!(labels, ["0", "1", "2–3", "4–7", "8–15"]);
        let counts: Vec<usize> = b.iter().map(|x| x.1).collect();
        assert_eq!(counts, [1, 2, 2, 1, 1]);
        assert!(support_bins(&[]).is_empty());
    }

    #[test]
    fn ticks_are_round_and_cover_the_maximum() {
        let (top, t) = linear_ticks(23);
        assert_eq!(top, 25);
        assert_eq!(t.last().unwrap().1, "25");
        let (_, t) = log_ticks(37);
        let l: Vec<&str> = t.iter().map(|x| x.1.as_str()).collect();
        assert_eq!(l, ["1", "2", "5", "10", "20", "50"]);
        assert!((t.last().unwrap().0 - 1.0).abs() < 1e-9);
    }
}
