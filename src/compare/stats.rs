//! Agreement and rank statistics for comparing answers with corpus support: Cohen's kappa,
//! ROC AUC (Mann–Whitney with mid-ranks, so ties count one half) and Spearman's rho (Pearson on
//! average ranks). Each returns `None` when the statistic is undefined for its input.

/// Average ranks (1-based); tied values share the mean of their positions.
pub fn ranks(v: &[f64]) -> Vec<f64> {
    let mut idx: Vec<usize> = (0..v.len()).collect();
    idx.sort_by(|&a, &b| v[a].total_cmp(&v[b]));
    let mut out = vec![0.0; v.len()];
    let mut i = 0;
    while i < idx.len() {
        let mut j = i;
        while j + 1 < idx.len() && v[idx[j + 1]] == v[idx[i]] {
            j += 1;
        }
        let r = (i + j) as f64 / 2.0 + 1.0;
        for &k in &idx[i..=j] {
            out[k] = r;
        }
        i = j + 1;
    }
    out
}

/// Cohen's kappa between two raters' labels over the union of labels.
pub fn cohen_kappa<T: Ord + Clone>(a: &[T], b: &[T]) -> Option<f64> {
    if a.len() != b.len() || a.is_empty() {
        return None;
    }
    let n = a.len() as f64;
    let mut labels: Vec<T> = a.iter().chain(b).cloned().collect();
    labels.sort();
    labels.dedup();
    let po = a.iter().zip(b).filter(|(x, y)| x == y).count() as f64 / n;
    let pe: f64 = labels
        .iter()
        .map(|l| {
            let ca = a.iter().filter(|x| *x == l).count() as f64;
            let cb = b.iter().filter(|x| *x == l).count() as f64;
            ca * cb / (n * n)
        })
        .sum();
    if (1.0 - pe).abs() < f64::EPSILON {
        return None;
    }
    Some((po - pe) / (1.0 - pe))
}

/// Area under the ROC curve of `scores` predicting `labels`.
pub fn roc_auc(scores: &[f64], labels: &[bool]) -> Option<f64> {
    if scores.len() != labels.len() {
        return None;
    }
    let pos = labels.iter().filter(|&&l| l).count() as f64;
    let neg = labels.len() as f64 - pos;
    if pos == 0.0 || neg == 0.0 {
        return None;
    }
    let r = ranks(scores);
    let sum_pos: f64 = r
        .iter()
        .zip(labels)
        .filter(|(_, &l)| l)
        .map(|(r, _)| r)
        .sum();
    Some((sum_pos - pos * (pos + 1.0) / 2.0) / (pos * neg))
}

/// Spearman's rank correlation.
pub fn spearman(x: &[f64], y: &[f64]) -> Option<f64> {
    if x.len() != y.len() || x.len() < 2 {
        return None;
    }
    pearson(&ranks(x), &ranks(y))
}

/// Pearson's correlation.
pub fn pearson(x: &[f64], y: &[f64]) -> Option<f64> {
    let n = x.len() as f64;
    let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
    let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
    for (a, b) in x.iter().zip(y) {
        sxy += (a - mx) * (b - my);
        sxx += (a - mx) * (a - mx);
        syy += (b - my) * (b - my);
    }
    if sxx == 0.0 || syy == 0.0 {
        return None;
    }
    Some(sxy / (sxx * syy).sqrt())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn kappa_of_a_worked_example() {
        // po = 0.75, pe = 0.5·0.25 + 0.5·0.75 = 0.5.
        let k = cohen_kappa(&[1, 1, 0, 0], &[1, 0, 0, 0]).unwrap();
        assert!((k - 0.5).abs() < 1e-12);
        assert_eq!(cohen_kappa(&[1, 1], &[1, 1]), None);
    }

    #[test]
    fn auc_counts_ties_as_half() {
        let a = roc_auc(&[0.1, 0.4, 0.35, 0.8], &[false, false, true, true]).unwrap();
        assert!((a - 0.75).abs() < 1e-12);
        let t = roc_auc(&[1.0, 1.0, 0.0, 1.0], &[true, false, false, true]).unwrap();
        assert!((t - 0.75).abs() < 1e-12);
        assert_eq!(roc_auc(&[1.0], &[true]), None);
    }

    #[test]
    fn spearman_with_ties() {
        let r = spearman(&[1.0, 2.0, 3.0, 4.0, 5.0], &[5.0, 6.0, 7.0, 8.0, 7.0]).unwrap();
        assert!((r - 0.8207826816681233).abs() < 1e-12);
        assert_eq!(spearman(&[1.0, 1.0], &[1.0, 2.0]), None);
    }
}
