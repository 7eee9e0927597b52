//! Cohen's kappa, ROC AUC and Spearman's rho of `hearsay::compare::stats` against the reference
//! implementations in scikit-learn (`sklearn.metrics.cohen_kappa_score`, `roc_auc_score`) and
//! scipy (`scipy.stats.spearmanr`), on fixed inputs with ties, run at test time.

use hearsay::compare::stats;
use std::process::Command;

const SCRIPT: &str = r#"
import json, sys
from sklearn.metrics import cohen_kappa_score, roc_auc_score
from scipy.stats import spearmanr
cases = json.load(sys.stdin)
out = {
    "kappa": [cohen_kappa_score(a, b) for a, b in cases["kappa"]],
    "auc": [roc_auc_score(y, s) for s, y in cases["auc"]],
    "spearman": [spearmanr(x, y).statistic for x, y in cases["spearman"]],
}
print(json.dumps(out))
"#;

fn lcg(seed: &mut u64) -> u64 {
    *seed = seed
        .wrapping_mul(6364136223846793005)
        .wrapping_add(1442695040888963407);
    *seed >> 33
}

#[test]
fn kappa_auc_and_spearman_match_scipy_and_scikit_learn() {
    let labels = ["yes", "no", "unsure"];
    let mut seed = 7u64;
    let mut kappa: Vec<(Vec<&str>, Vec<&str>)> = vec![(
        vec!["yes", "yes", "no", "unsure", "no", "yes"],
        vec!["yes", "no", "no", "no", "no", "yes"],
    )];
    let mut auc: Vec<(Vec<f64>, Vec<bool>)> = vec![(
        vec![0.0, 0.0, 1.0, 3.0, 3.0, 7.0, 0.0, 2.0],
        vec![false, true, false, true, true, true, false, false],
    )];
    let mut rho: Vec<(Vec<f64>, Vec<f64>)> = vec![(
        vec![0.0, 0.0, 1.0, 2.0, 2.0, 5.0, 9.0],
        vec![0.1, 0.5, 0.5, 0.9, 0.2, 1.0, 0.7],
    )];
    for n in [12usize, 40, 97] {
        let a: Vec<&str> = (0..n)
            .map(|_| labels[(lcg(&mut seed) % 3) as usize])
            .collect();
        let b: Vec<&str> = (0..n)
            .map(|_| labels[(lcg(&mut seed) % 2) as usize])
            .collect();
        kappa.push((a, b));
        // Small integer scores, so that ties are common, as with claim counts.
        let s: Vec<f64> = (0..n).map(|_| (lcg(&mut seed) % 6) as f64).collect();
        let y: Vec<bool> = s
            .iter()
            .map(|v| lcg(&mut seed) % 10 < 2 + *v as u64)
            .collect();
        auc.push((s.clone(), y));
        let p: Vec<f64> = (0..n).map(|_| (lcg(&mut seed) % 5) as f64 / 4.0).collect();
        rho.push((s, p));
    }
    let input = serde_json::json!({"kappa": kappa, "auc": auc, "spearman": rho});
    let mut child = Command::new("python3")
        .arg("-c")
        .arg(SCRIPT)
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .spawn()
        .expect("python3 runs (scipy and scikit-learn are installed by .ci/run)");
    {
        use std::io::Write;
        let mut stdin = child.stdin.take().unwrap();
        stdin.write_all(input.to_string().as_bytes()).unwrap();
    }
    let out = child.wait_with_output().unwrap();
    assert!(out.status.success(), "the reference script failed");
    let want: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let close = |ours: f64, theirs: &serde_json::Value, what: &str| {
        let t = theirs.as_f64().unwrap();
        assert!(
            (ours - t).abs() < 1e-9,
            "{what}: ours {ours}, reference {t}"
        );
    };
    for (i, (a, b)) in kappa.iter().enumerate() {
        close(
            stats::cohen_kappa(a, b).unwrap(),
            &want["kappa"][i],
            "kappa",
        );
    }
    for (i, (s, y)) in auc.iter().enumerate() {
        close(stats::roc_auc(s, y).unwrap(), &want["auc"][i], "auc");
    }
    for (i, (x, y)) in rho.iter().enumerate() {
        close(
            stats::spearman(x, y).unwrap(),
            &want["spearman"][i],
            "spearman",
        );
    }
}
