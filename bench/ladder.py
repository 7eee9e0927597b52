#!/usr/bin/env python3
"""Scale ladder (called by bench/ladder.sh after the release build).

The eLife articles are written as one JSON Lines dump per rung (1x, 8x, 32x by default: the
corpus repeated, each copy's records with ids of their own), each dump is scanned into a store of
its own, and the queries a user runs most are timed as cold processes on every store: their cost
should follow the size of the answer, not of the corpus, and the ladder shows whether it does.
At the top rung the dump is also extracted copy by copy into shards and merged, to check that
merge stays in bounded memory and well under the scan's time.

Every command runs under /usr/bin/time -v (wall time and peak RSS). Query runs are interleaved
across commands and rungs, so a slow spell on a shared machine falls on all of them and the
ratios between rungs are measured side by side. Standard library only.
"""
import argparse
import datetime
import json
import os
import re
import shutil
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
HEARSAY = os.path.join(ROOT, "target", "release", "hearsay")
CORPUS = os.path.join(ROOT, "..", "shared", "data", "elife-articles", "articles")
MB = 1e6  # throughput and sizes in decimal megabytes (RSS is reported in MiB, as time -v counts)
QUERIES = ("top", "conflicts", "graph_graphml", "claims_cause_limit100", "pair", "report")


def fail(step, detail):
    """Stop the whole run, naming the step that failed: a benchmark with a silently missing
    figure is worse than no benchmark."""
    sys.exit(f"ladder: step '{step}' failed: {detail}")


def timed(step, cmd, stdin=None, stdout=None):
    """Run cmd under /usr/bin/time -v; return (wall seconds, peak RSS MiB, stderr text).
    stdin and stdout are file paths (default: the null device). The wall time is taken here
    (time -v prints hundredths, too coarse for a 100 ms target); it includes starting time -v
    itself, about a millisecond."""
    try:
        with open(stdin or os.devnull, "rb") as inp, open(stdout or os.devnull, "wb") as out:
            t0 = time.perf_counter()
            p = subprocess.run(["/usr/bin/time", "-v"] + cmd, stdin=inp, stdout=out,
                               stderr=subprocess.PIPE, text=True)
            secs = time.perf_counter() - t0
    except OSError as e:
        fail(step, f"{e} ({' '.join(cmd)})")
    if p.returncode != 0:
        fail(step, f"exit status {p.returncode}: {' '.join(cmd)}\n{p.stderr[-2000:]}")
    rss = re.search(r"Maximum resident set size \(kbytes\): (\d+)", p.stderr)
    if not rss:
        fail(step, "no peak RSS from /usr/bin/time -v")
    return secs, int(rss.group(1)) / 1024.0, p.stderr


def hs(store, *args):
    """A hearsay command line on one store, quiet (progress bars would cost time)."""
    return [HEARSAY, "-q", "--store", store] + list(args)


def article_files(corpus):
    files = sorted(os.path.join(r, n) for r, _, ns in os.walk(corpus) for n in ns)
    if not files:
        fail("dump", f"no files under {corpus}")
    return files


def write_copies(files, corpus, copies, out):
    """Write `copies` copies of the corpus to the open file `out`, one record a file, streamed one
    article at a time. Copy c's ids are prefixed `cNN/`, so every record names a document of its
    own and the store holds `copies` times the documents, not one copy re-read. Returns the bytes
    of article text written (UTF-8)."""
    text_bytes = 0
    for c in copies:
        for p in files:
            with open(p, encoding="utf-8", errors="replace") as f:
                text = f.read()
            text_bytes += len(text.encode("utf-8"))
            rec = {"id": f"c{c:02d}/{os.path.relpath(p, corpus)}", "text": text}
            out.write(json.dumps(rec, ensure_ascii=False) + "\n")
    return text_bytes


def tree_bytes(d):
    return sum(os.path.getsize(os.path.join(r, n)) for r, _, ns in os.walk(d) for n in ns)


def scan_rung(work, files, corpus, rung, keep):
    """Make the rung's dump, scan it into a fresh store (one run: a scan of the top rung takes
    minutes), and measure the store. The dump is deleted once scanned unless kept."""
    dump = os.path.join(work, f"dump-{rung}x.jsonl")
    store = os.path.join(work, f"store-{rung}x")
    try:
        with open(dump, "w", encoding="utf-8") as out:
            text_bytes = write_copies(files, corpus, range(rung), out)
    except OSError as e:
        fail(f"dump {rung}x", e)
    dump_bytes = os.path.getsize(dump)
    secs, rss, _ = timed(f"scan {rung}x", hs(store, "-j2", "--format", "json", "scan", dump))
    store_bytes = tree_bytes(store)
    if not keep:
        os.remove(dump)
    return store, {
        "records": rung * len(files), "text_mb": round(text_bytes / MB, 1),
        "dump_mb": round(dump_bytes / MB, 1),
        "scan": {"seconds": round(secs, 2), "peak_rss_mb": round(rss, 1),
                 "mb_per_s": round(dump_bytes / MB / secs, 2)},
        "store_mb": round(store_bytes / MB, 1),
        "store_over_text": round(store_bytes / text_bytes, 3),
    }


def pick_pair(store):
    """X and Y for pair and claims: the first causal row of `top --format json` on the smallest
    store. The same names are then asked of every rung, so the answers grow with the copies."""
    p = subprocess.run(hs(store, "--format", "json", "top", "-n", "0"), capture_output=True,
                       text=True)
    if p.returncode != 0:
        fail("pick X and Y (top)", p.stderr[-2000:])
    for line in p.stdout.splitlines():
        row = json.loads(line)
        if row.get("kind", "causal") == "causal":
            return row["cause"], row["effect"]
    fail("pick X and Y (top)", "no causal row in the smallest store")


def query_cmds(store, work, rung, x, y):
    report = os.path.join(work, f"report-{rung}x.html")
    return {
        "top": hs(store, "top"),
        "conflicts": hs(store, "conflicts"),
        "graph_graphml": hs(store, "--format", "graphml", "graph"),
        "claims_cause_limit100": hs(store, "claims", "--cause", x, "--limit", "100"),
        "pair": hs(store, "pair", x, y),
        "report": hs(store, "report", "-o", report),
    }


def run_queries(stores, work, x, y, runs):
    """Cold-process runs of every query on every store, interleaved (run 1 of every query on
    every rung, then run 2, ...); the median wall time and the largest peak RSS are kept."""
    cmds = {rung: query_cmds(store, work, rung, x, y) for rung, store in stores.items()}
    seen = {rung: {q: ([], []) for q in QUERIES} for rung in stores}
    for _ in range(runs):
        for rung, qs in cmds.items():
            for q, cmd in qs.items():
                w, r, _ = timed(f"{q} {rung}x", cmd)
                seen[rung][q][0].append(w)
                seen[rung][q][1].append(r)
    return {rung: {q: {"ms": round(statistics.median(w) * 1000, 1),
                       "runs_ms": [round(v * 1000, 1) for v in w],
                       "peak_rss_mb": round(max(r), 1)} for q, (w, r) in qs.items()}
            for rung, qs in seen.items()}


def pair_warm(store, rung, x, y, repeat):
    """`pair --repeat N`: the store opened once, the query answered N times in one process; the
    command prints the median per-query time on stderr."""
    _, rss, err = timed(f"pair warm {rung}x", hs(store, "pair", x, y, "--repeat", str(repeat)))
    med = re.search(r"median ([\d.]+) ms, fastest ([\d.]+) ms", err)
    if not med:
        fail(f"pair warm {rung}x", "no median in the output of --repeat")
    return {"median_ms": float(med.group(1)), "fastest_ms": float(med.group(2)),
            "queries": repeat, "peak_rss_mb": round(rss, 1)}


def merge_rung(work, files, corpus, rung, keep):
    """The top rung again as `rung` parts (one copy each, written and extracted one at a time
    with `extract --sentences`), merged into a fresh store. Only the merge is the figure; the
    extraction is recorded for scale."""
    shards, extract_secs = [], 0.0
    for c in range(rung):
        part = os.path.join(work, f"part-{c:02d}.jsonl")
        shard = os.path.join(work, f"shard-{c:02d}.jsonl")
        try:
            with open(part, "w", encoding="utf-8") as out:
                write_copies(files, corpus, [c], out)
        except OSError as e:
            fail(f"merge part {c}", e)
        secs, _, _ = timed(f"extract part {c}",
                           [HEARSAY, "-q", "-j2", "extract", "--sentences", part], stdout=shard)
        extract_secs += secs
        os.remove(part)
        shards.append(shard)
    store = os.path.join(work, f"store-merge-{rung}x")
    secs, rss, _ = timed(f"merge {rung} parts", hs(store, "-j2", "--format", "json", "merge",
                                                   *shards))
    res = {"parts": rung, "shards_mb": round(sum(map(os.path.getsize, shards)) / MB, 1),
           "extract_seconds_total": round(extract_secs, 1), "seconds": round(secs, 2),
           "peak_rss_mb": round(rss, 1), "store_mb": round(tree_bytes(store) / MB, 1)}
    if not keep:
        for s in shards:
            os.remove(s)
        shutil.rmtree(store, ignore_errors=True)
    return res


def target(desc, value, limit, unit):
    """One target as the summary prints it: the figure beside its limit, met or missed."""
    return {"target": desc, "value": value, "limit": limit, "unit": unit,
            "met": value is not None and value <= limit}


def targets(res, top, base):
    """The targets of the store issue. Figures named "at 32x" apply to the top rung (and say
    which rung that was); ratios compare the top rung with the bottom one."""
    q, qb = res["rungs"][str(top)]["queries"], res["rungs"][str(base)]["queries"]
    t = []
    for name, ms in (("top", 300), ("conflicts", 300), ("graph_graphml", 300),
                     ("pair", 100), ("claims_cause_limit100", 200), ("report", 3000)):
        t.append(target(f"{name} at {top}x, cold", q[name]["ms"], ms, "ms"))
    t.append(target(f"pair at {top}x, warm (--repeat)", res["rungs"][str(top)]["pair_warm"]
                    ["median_ms"], 10, "ms"))
    for name in QUERIES:
        t.append(target(f"{name} time {top}x / {base}x", round(q[name]["ms"] / qb[name]["ms"], 2),
                        2, "ratio"))
        t.append(target(f"{name} peak RSS {top}x / {base}x",
                        round(q[name]["peak_rss_mb"] / qb[name]["peak_rss_mb"], 2), 2, "ratio"))
    worst = max((v["peak_rss_mb"], f"{name} {r}x") for r, rr in res["rungs"].items()
                for name, v in rr["queries"].items())
    t.append(target(f"largest query peak RSS, any rung ({worst[1]})", worst[0], 200, "MiB"))
    for r, rr in res["rungs"].items():
        t.append(target(f"store size / input text at {r}x", rr["store_over_text"], 0.5, "ratio"))
    t.append(target(f"scan peak RSS at {top}x", res["rungs"][str(top)]["scan"]["peak_rss_mb"],
                    1024, "MiB"))
    if res.get("merge"):
        m = res["merge"]
        t.append(target(f"merge of {m['parts']} parts, peak RSS", m["peak_rss_mb"], 500, "MiB"))
        t.append(target(f"merge of {m['parts']} parts / scan at {top}x, time",
                        round(m["seconds"] / res["rungs"][str(top)]["scan"]["seconds"], 3),
                        0.10, "ratio"))
    return t


def print_table(res, rungs):
    hdr = "".join(f"{f'{r}x ms':>10}{'MiB':>7}" for r in rungs)
    print(f"\nX = {res['pair'][0]!r}, Y = {res['pair'][1]!r}; median of {res['runs']} cold runs")
    print(f"{'query':<24}{hdr}")
    for q in QUERIES:
        cells = "".join(f"{res['rungs'][str(r)]['queries'][q]['ms']:>10.1f}"
                        f"{res['rungs'][str(r)]['queries'][q]['peak_rss_mb']:>7.0f}" for r in rungs)
        print(f"{q:<24}{cells}")
    cells = "".join(f"{res['rungs'][str(r)]['pair_warm']['median_ms']:>10.2f}"
                    f"{res['rungs'][str(r)]['pair_warm']['peak_rss_mb']:>7.0f}" for r in rungs)
    print(f"{'pair warm (per query)':<24}{cells}")
    print(f"\n{'rung':<6}{'dump MB':>9}{'scan s':>9}{'MB/s':>7}{'scan MiB':>10}{'store MB':>10}"
          f"{'store/text':>11}")
    for r in rungs:
        rr = res["rungs"][str(r)]
        print(f"{str(r) + 'x':<6}{rr['dump_mb']:>9.1f}{rr['scan']['seconds']:>9.1f}"
              f"{rr['scan']['mb_per_s']:>7.2f}{rr['scan']['peak_rss_mb']:>10.0f}"
              f"{rr['store_mb']:>10.1f}{rr['store_over_text']:>11.3f}")
    if res.get("merge"):
        m = res["merge"]
        print(f"merge of {m['parts']} parts: {m['seconds']:.1f} s, {m['peak_rss_mb']:.0f} MiB")
    print()
    for t in res["targets"]:
        print(f"{'met ' if t['met'] else 'MISS'} {t['target']}: {t['value']} "
              f"(limit {t['limit']} {t['unit']})")


def parse_args():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rungs", default="1,8,32", help="copies of the corpus per rung")
    ap.add_argument("--out", help="JSON summary (default bench/results/ladder-<date>.json)")
    ap.add_argument("--keep", metavar="DIR", help="make dumps and stores in DIR and keep them")
    ap.add_argument("--runs", type=int, default=3, help="cold runs per query (median)")
    ap.add_argument("--repeat", type=int, default=20, help="queries of the warm pair run")
    ap.add_argument("--no-merge", action="store_true",
                    help="skip the merge of the top rung's parts (its targets are then absent)")
    ap.add_argument("--corpus", default=CORPUS, help="folder of plain-text articles")
    ap.add_argument("--bin", help="the hearsay binary to measure (default: the release build), "
                    "to measure an older build side by side")
    a = ap.parse_args()
    try:
        a.rungs = sorted({int(r) for r in a.rungs.split(",")})
    except ValueError:
        ap.error(f"--rungs: not a list of numbers: {a.rungs}")
    if not a.rungs or a.rungs[0] < 1 or a.rungs[-1] > 99:
        ap.error("--rungs: copies from 1 to 99")
    return a


def main():
    global HEARSAY
    a = parse_args()
    if a.bin:
        HEARSAY = os.path.abspath(a.bin)
    files = article_files(a.corpus)
    if a.keep:
        os.makedirs(a.keep, exist_ok=True)
    work = a.keep or tempfile.mkdtemp(prefix="hearsay-ladder-")
    base, top = a.rungs[0], a.rungs[-1]
    started = datetime.datetime.now(datetime.timezone.utc)
    res = {"date": started.isoformat(timespec="seconds"),
           "commit": subprocess.run(["git", "-C", ROOT, "rev-parse", "--short", "HEAD"],
                                    capture_output=True, text=True).stdout.strip(),
           "corpus": os.path.relpath(os.path.realpath(a.corpus), os.path.dirname(ROOT)),
           "corpus_source": "shared/data/elife-articles/SOURCE.txt", "articles": len(files),
           "rungs_copies": a.rungs, "runs": a.runs,
           "load_average_before": [round(v, 2) for v in os.getloadavg()], "rungs": {}}
    try:
        stores = {}
        for r in a.rungs:
            print(f"ladder: {r}x: dump and scan", flush=True)
            stores[r], res["rungs"][str(r)] = scan_rung(work, files, a.corpus, r, a.keep)
        res["pair"] = list(pick_pair(stores[base]))
        print(f"ladder: queries, {a.runs} runs interleaved over {len(stores)} stores", flush=True)
        for r, q in run_queries(stores, work, *res["pair"], a.runs).items():
            res["rungs"][str(r)]["queries"] = q
        for r, store in stores.items():
            res["rungs"][str(r)]["pair_warm"] = pair_warm(store, r, *res["pair"], a.repeat)
        if not a.keep:
            for store in stores.values():
                shutil.rmtree(store, ignore_errors=True)
        if not a.no_merge:
            print(f"ladder: merge of {top} parts", flush=True)
            res["merge"] = merge_rung(work, files, a.corpus, top, a.keep)
    finally:
        if not a.keep:
            shutil.rmtree(work, ignore_errors=True)
    res["seconds_total"] = round((datetime.datetime.now(datetime.timezone.utc) - started)
                                 .total_seconds())
    res["load_average_after"] = [round(v, 2) for v in os.getloadavg()]
    res["notes"] = ("Measured on a 2-core machine shared with other workers: absolute times carry "
                    "their noise; the query runs are interleaved across commands and rungs, so "
                    "ratios between rungs are fairer than absolute figures. Scans and the merge "
                    "are one run each. Sizes and throughput in MB of 10^6 bytes, RSS in MiB.")
    res["targets"] = targets(res, top, base)
    path = a.out or os.path.join(ROOT, "bench", "results",
                                 f"ladder-{started.strftime('%Y%m%d-%H%M%S')}.json")
    os.makedirs(os.path.dirname(os.path.abspath(path)), exist_ok=True)
    with open(path, "w") as f:
        json.dump(res, f, indent=2)
        f.write("\n")
    print_table(res, a.rungs)
    print(f"summary: {os.path.relpath(path, os.getcwd())}")


if __name__ == "__main__":
    main()
