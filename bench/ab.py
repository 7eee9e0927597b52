#!/usr/bin/env python3
"""Two hearsay binaries side by side: `extract -j1` of each, ripgrep and the Python `re` baseline
over the dense corpus and the sparse one, their runs alternating (before, after, ripgrep,
baseline, then the same on the sparse corpus, N times), so that a slow spell of a shared machine
falls on all of them. Reports the median wall time and CPU seconds (user + system) of each, MB
per CPU-second, and the ratios the speed targets name, for both binaries.

usage: bench/ab.py BEFORE_BINARY [AFTER_BINARY] [--runs N] [--out FILE] [--dense DIR] [--sparse DIR]
(AFTER_BINARY defaults to target/release/hearsay; build it first.)
"""
import argparse
import datetime
import json
import os
import shutil
import statistics
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench import CPU, HEARSAY, ROOT, corpus_bytes, timed  # noqa: E402


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("before")
    ap.add_argument("after", nargs="?", default=HEARSAY)
    ap.add_argument("--runs", type=int, default=3)
    ap.add_argument("--out")
    ap.add_argument("--dense",
                    default=os.path.join(ROOT, "..", "shared", "data", "elife-articles", "articles"))
    ap.add_argument("--sparse",
                    default=os.path.join(ROOT, "..", "shared", "data", "general-text", "docs"))
    a = ap.parse_args()
    tmp = tempfile.mkdtemp(prefix="hearsay-ab-")
    try:
        corpora = {}
        for name, src in (("dense", a.dense), ("sparse", a.sparse)):
            dst = os.path.join(tmp, name)
            shutil.copytree(src, dst)
            corpora[name] = (dst, corpus_bytes(dst) / 1e6)
        cues = os.path.join(tmp, "cues.txt")
        with open(cues, "w") as f:
            subprocess.run([a.after, "patterns", "list", "--literals"], stdout=f, check=True)
        baseline = [sys.executable, os.path.join(ROOT, "bench", "baseline.py"), cues]
        cmds = {}
        for name, (d, _) in corpora.items():
            cmds[f"{name}_before"] = [a.before, "-q", "-j1", "extract", d]
            cmds[f"{name}_after"] = [a.after, "-q", "-j1", "extract", d]
            cmds[f"{name}_ripgrep"] = ["rg", "-c", "-i", "-w", "-f", cues, "-j1", d]
            cmds[f"{name}_python_re"] = baseline + [d]
        seen = {k: ([], []) for k in cmds}
        for r in range(max(1, a.runs)):
            for k, cmd in cmds.items():
                w, _, _ = timed(cmd)
                seen[k][0].append(w)
                seen[k][1].append(CPU[-1])
                print(f"run {r + 1} {k:<20} {w:7.2f} s wall {CPU[-1]:7.2f} CPU-s", file=sys.stderr)
        m = {}
        for k, (walls, cpus) in seen.items():
            mb = corpora[k.split("_")[0]][1]
            cpu = statistics.median(cpus)
            m[k] = {"seconds": statistics.median(walls), "cpu_seconds": cpu, "runs": walls,
                    "cpu_runs": cpus, "mb_per_cpu_s": round(mb / max(cpu, 1e-3), 2)}
        ratios = {}
        for name in corpora:
            for which in ("before", "after"):
                ex = m[f"{name}_{which}"]
                for ref in ("ripgrep", "python_re"):
                    r = m[f"{name}_{ref}"]
                    ratios[f"{name}_{which}_over_{ref}_wall"] = round(ex["seconds"] / r["seconds"], 2)
                    ratios[f"{name}_{which}_over_{ref}_cpu"] = round(
                        ex["cpu_seconds"] / max(r["cpu_seconds"], 1e-3), 2)
            ratios[f"{name}_after_over_before_cpu"] = round(
                m[f"{name}_after"]["cpu_seconds"] / m[f"{name}_before"]["cpu_seconds"], 3)
        res = {"date": datetime.datetime.now(datetime.timezone.utc).isoformat(timespec="seconds"),
               "runs": a.runs, "before": a.before, "after": a.after,
               "corpora": {n: {"corpus": os.path.basename(os.path.normpath(s)),
                               "megabytes": round(corpora[n][1], 2)}
                           for n, s in (("dense", a.dense), ("sparse", a.sparse))},
               "measures": m, "ratios": ratios}
        print(f"{'measure':<22} {'wall s':>7} {'CPU s':>7} {'MB/CPU-s':>9}")
        for k, v in m.items():
            print(f"{k:<22} {v['seconds']:>7.2f} {v['cpu_seconds']:>7.2f} {v['mb_per_cpu_s']:>9.1f}")
        for k, v in ratios.items():
            print(f"{k:<40} {v}")
        out = a.out or os.path.join(
            ROOT, "bench", "results",
            "ab-" + datetime.datetime.now().strftime("%Y%m%d-%H%M%S") + ".json")
        with open(out, "w") as f:
            json.dump(res, f, indent=1)
        print(f"wrote {out}")
    finally:
        shutil.rmtree(tmp, ignore_errors=True)


if __name__ == "__main__":
    main()
