//! A force-directed layout (Fruchterman–Reingold) for the report's claim-graph picture.
//!
//! The picture shows a few dozen edges, so the quadratic repulsion step is cheap. The layout is
//! deterministic: nodes start on a circle in the order given and the cooling schedule is fixed,
//! so the same graph always gives the same picture (and the same screenshot in tests).

/// A laid-out point, in the unit square [0, 1] × [0, 1].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Point {
    pub x: f64,
    pub y: f64,
}

const ITERATIONS: usize = 400;
/// Strength of the pull to the centre.
const GRAVITY: f64 = 1.5;

/// Lay out `n` nodes joined by undirected `edges` (indices into the nodes; repeats and
/// self-loops are harmless). Returns one point per node, scaled to fill the unit square.
pub fn force_directed(n: usize, edges: &[(usize, usize)]) -> Vec<Point> {
    if n == 0 {
        return Vec::new();
    }
    if n == 1 {
        return vec![Point { x: 0.5, y: 0.5 }];
    }
    // Ideal edge length for a unit-area frame.
    let k = (1.0 / n as f64).sqrt();
    let mut pos: Vec<(f64, f64)> = (0..n)
        .map(|i| {
            let a = std::f64::consts::TAU * i as f64 / n as f64;
            (0.5 + 0.4 * a.cos(), 0.5 + 0.4 * a.sin())
        })
        .collect();
    let mut temp = 0.1;
    let cooling = temp / ITERATIONS as f64;
    for _ in 0..ITERATIONS {
        let mut disp = vec![(0.0f64, 0.0f64); n];
        for i in 0..n {
            for j in (i + 1)..n {
                let (dx, dy) = (pos[i].0 - pos[j].0, pos[i].1 - pos[j].1);
                let d = (dx * dx + dy * dy).sqrt().max(1e-4);
                let f = k * k / d;
                let (fx, fy) = (dx / d * f, dy / d * f);
                disp[i].0 += fx;
                disp[i].1 += fy;
                disp[j].0 -= fx;
                disp[j].1 -= fy;
            }
        }
        for &(a, b) in edges {
            if a == b || a >= n || b >= n {
                continue;
            }
            let (dx, dy) = (pos[a].0 - pos[b].0, pos[a].1 - pos[b].1);
            let d = (dx * dx + dy * dy).sqrt().max(1e-4);
            let f = d * d / k;
            let (fx, fy) = (dx / d * f, dy / d * f);
            disp[a].0 -= fx;
            disp[a].1 -= fy;
            disp[b].0 += fx;
            disp[b].1 += fy;
        }
        for i in 0..n {
            // A weak pull to the centre keeps components without edges between them together.
            disp[i].0 += (0.5 - pos[i].0) * GRAVITY;
            disp[i].1 += (0.5 - pos[i].1) * GRAVITY;
            let (dx, dy) = disp[i];
            let d = (dx * dx + dy * dy).sqrt().max(1e-9);
            let step = d.min(temp);
            pos[i].0 += dx / d * step;
            pos[i].1 += dy / d * step;
        }
        temp = (temp - cooling).max(1e-4);
    }
    normalise(&pos)
}

/// Scale points to fill [0, 1] on both axes (keeping a degenerate axis at 0.5).
fn normalise(pos: &[(f64, f64)]) -> Vec<Point> {
    let (mut x0, mut x1, mut y0, mut y1) = (f64::MAX, f64::MIN, f64::MAX, f64::MIN);
    for &(x, y) in pos {
        x0 = x0.min(x);
        x1 = x1.max(x);
        y0 = y0.min(y);
        y1 = y1.max(y);
    }
    let scale = |v: f64, lo: f64, hi: f64| {
        if hi - lo < 1e-9 {
            0.5
        } else {
            (v - lo) / (hi - lo)
        }
    };
    pos.iter()
        .map(|&(x, y)| Point {
            x: scale(x, x0, x1),
            y: scale(y, y0, y1),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn dist(a: Point, b: Point) -> f64 {
        ((a.x - b.x).powi(2) + (a.y - b.y).powi(2)).sqrt()
    }

    #[test]
    fn joined_nodes_end_closer_than_unjoined_ones_and_layout_is_deterministic() {
        // Two triangles joined by one bridge edge: nodes of one triangle sit together.
        let edges = [(0, 1), (1, 2), (2, 0), (3, 4), (4, 5), (5, 3), (2, 3)];
        let p = force_directed(6, &edges);
        assert_eq!(p, force_directed(6, &edges));
        assert!(p
            .iter()
            .all(|q| (0.0..=1.0).contains(&q.x) && (0.0..=1.0).contains(&q.y)));
        let within = (dist(p[0], p[1]) + dist(p[3], p[4])) / 2.0;
        let across = (dist(p[0], p[4]) + dist(p[1], p[5])) / 2.0;
        assert!(within < across, "{within} vs {across}");
        for i in 0..6 {
            for j in (i + 1)..6 {
                assert!(dist(p[i], p[j]) > 0.05, "nodes {i} and {j} overlap");
            }
        }
    }

    #[test]
    fn tiny_graphs() {
        assert!(force_directed(0, &[]).is_empty());
        assert_eq!(force_directed(1, &[]), vec![Point { x: 0.5, y: 0.5 }]);
        assert_eq!(force_directed(2, &[(0, 1)]).len(), 2);
    }
}
