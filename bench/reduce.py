#!/usr/bin/env python3
"""The reduce step of a cluster run, measured (called by bench/reduce.sh after the release build).

N parts, each one copy of the eLife articles as a JSON Lines dump with ids of its own, go through
both cluster recipes of docs/cluster.md: scanned into a part store each and joined by `link`, and
extracted into a shard each (`extract --sentences`) and joined by `merge`. The map steps run one
after the other, as single tasks would; their CPU time is recorded so that the reduce can be set
against it. Only the reduce steps are the figures: wall time and peak RSS under /usr/bin/time -v.
The linked store is checked to hold every part's files and claims. Standard library only; the
dump and timing helpers are the scale ladder's (bench/ladder.py).
"""
import argparse
import datetime
import json
import os
import re
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import ladder  # noqa: E402
from ladder import MB, article_files, fail, hs, timed, tree_bytes, write_copies  # noqa: E402


def cpu_seconds(time_v):
    """User plus system CPU seconds from /usr/bin/time -v's report."""
    total = 0.0
    for what in ("User", "System"):
        m = re.search(rf"{what} time \(seconds\): ([\d.]+)", time_v)
        if not m:
            fail("CPU time", f"no {what} time from /usr/bin/time -v")
        total += float(m.group(1))
    return total


def make_parts(work, files, corpus, n):
    """Each part's dump, scanned into its part store and extracted into its shard. The dump is
    deleted once both are made."""
    stores, shards = [], []
    scan = {"seconds": 0.0, "cpu_seconds": 0.0, "peak_rss_mb": 0.0}
    extract = {"seconds": 0.0, "cpu_seconds": 0.0}
    text_bytes = 0
    for c in range(n):
        dump = os.path.join(work, f"part-{c:05d}.jsonl")
        try:
            with open(dump, "w", encoding="utf-8") as out:
                text_bytes += write_copies(files, corpus, [c], out)
        except OSError as e:
            fail(f"dump {c}", e)
        store = os.path.join(work, "parts", f"part-{c:05d}")
        secs, rss, rep = timed(f"scan part {c}", hs(store, "-j2", "scan", dump))
        scan["seconds"] += secs
        scan["cpu_seconds"] += cpu_seconds(rep)
        scan["peak_rss_mb"] = max(scan["peak_rss_mb"], rss)
        shard = os.path.join(work, "shards", f"part-{c:05d}.jsonl")
        secs, _, rep = timed(f"extract part {c}",
                             [ladder.HEARSAY, "-q", "-j2", "extract", "--sentences", dump],
                             stdout=shard)
        extract["seconds"] += secs
        extract["cpu_seconds"] += cpu_seconds(rep)
        os.remove(dump)
        stores.append(store)
        shards.append(shard)
        print(f"reduce: part {c + 1} of {n} made", flush=True)
    for d in (scan, extract):
        for k in d:
            d[k] = round(d[k], 1)
    return stores, shards, text_bytes, scan, extract


def totals(store):
    """Files and (documents, sentences, claims) of a store, from its manifest."""
    with open(os.path.join(store, "manifest.json"), encoding="utf-8") as f:
        m = json.load(f)
    sums = [sum(f[k] for f in m["files"]) for k in ("documents", "sentences", "claims")]
    return len(m["files"]), sums


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--parts", type=int, default=32)
    ap.add_argument("--out", help="summary file (default bench/results/reduce-<N>-parts.json)")
    ap.add_argument("--keep", help="work in this folder and keep it (default: a temporary one)")
    ap.add_argument("--bin", help="the hearsay binary (default target/release/hearsay)")
    ap.add_argument("--corpus", default=ladder.CORPUS)
    a = ap.parse_args()
    if a.bin:
        ladder.HEARSAY = os.path.abspath(a.bin)
    out = a.out or os.path.join(ladder.ROOT, "bench", "results", f"reduce-{a.parts}-parts.json")
    work = a.keep or tempfile.mkdtemp(prefix="hearsay-reduce-")
    for d in ("parts", "shards"):
        os.makedirs(os.path.join(work, d), exist_ok=True)
    try:
        files = article_files(a.corpus)
        stores, shards, text_bytes, scan, extract = make_parts(work, files, a.corpus, a.parts)
        linked = os.path.join(work, "linked")
        secs, rss, rep = timed("link", hs(linked, "link", *stores))
        link = {"seconds": round(secs, 2), "cpu_seconds": round(cpu_seconds(rep), 2),
                "peak_rss_mb": round(rss, 1)}
        merged = os.path.join(work, "merged")
        secs, rss, rep = timed("merge", hs(merged, "-j2", "merge", *shards))
        merge = {"seconds": round(secs, 2), "cpu_seconds": round(cpu_seconds(rep), 2),
                 "peak_rss_mb": round(rss, 1), "shards_mb": round(sum(map(os.path.getsize,
                                                                          shards)) / MB, 1)}
        want = [totals(s) for s in stores]
        expect = (sum(w[0] for w in want), [sum(w[1][i] for w in want) for i in range(3)])
        for name, store in (("link", linked), ("merge", merged)):
            got = totals(store)
            if got != expect:
                fail(f"check {name}", f"{got} files and counts, the parts hold {expect}")
        res = {
            "date": datetime.datetime.now(datetime.timezone.utc).isoformat(timespec="seconds"),
            "machine": f"{os.cpu_count()} cores (shared)",
            "parts": a.parts,
            "text_mb": round(text_bytes / MB, 1),
            "documents": expect[1][0], "claims": expect[1][2],
            "parts_store_mb": round(sum(tree_bytes(s) for s in stores) / MB, 1),
            "map_scan": scan,
            "map_extract": extract,
            "link": link,
            "merge": merge,
            "link_over_scan_cpu": round(link["cpu_seconds"] / scan["cpu_seconds"], 4),
            "link_over_merge_wall": round(link["seconds"] / merge["seconds"], 4),
            "note": "map steps run one after the other on one machine; only link and merge "
                    "are the figures. Wall times on a shared machine vary; peak RSS is steadier.",
        }
    finally:
        if not a.keep:
            shutil.rmtree(work, ignore_errors=True)
    os.makedirs(os.path.dirname(out), exist_ok=True)
    with open(out, "w", encoding="utf-8") as f:
        json.dump(res, f, indent=2)
        f.write("\n")
    print(f"link of {a.parts} parts: {link['seconds']:.2f} s, {link['peak_rss_mb']:.0f} MiB "
          f"({100 * res['link_over_scan_cpu']:.2f}% of the parts' scan CPU time); merge of "
          f"{a.parts} shards: {merge['seconds']:.1f} s, {merge['peak_rss_mb']:.0f} MiB")
    print(f"summary: {out}")


if __name__ == "__main__":
    main()
