#!/usr/bin/env bash
# Record the output of every subcommand, in every format, on the demo corpus and (when the shared
# data is there) the eLife articles, so that a refactor can be checked byte for byte:
#
#   tools/snapshot-outputs.sh /tmp/before          # on the old commit
#   tools/snapshot-outputs.sh /tmp/after           # on the new one
#   diff -r /tmp/before /tmp/after && echo identical
#
# Options: --bin PATH (a hearsay binary; default: build target/release/hearsay), --demo-only.
# Timings (scan's seconds) are masked; nothing else is. Paths in the output are relative to a
# scratch folder with the corpora linked in as `demo/` and `elife/`, so they do not depend on
# where the clone or the output folder is.
set -euo pipefail

repo="$(cd "$(dirname "$0")/.." && pwd)"
out=""
bin=""
demo_only=0
while [ $# -gt 0 ]; do
  case "$1" in
    --bin) bin="$2"; shift 2 ;;
    --demo-only) demo_only=1; shift ;;
    -h|--help) sed -n '2,12p' "$0"; exit 0 ;;
    *) out="$1"; shift ;;
  esac
done
[ -n "$out" ] || { echo "usage: $0 OUT_DIR [--bin PATH] [--demo-only]" >&2; exit 2; }

if [ -z "$bin" ]; then
  (cd "$repo" && cargo build --release --quiet)
  bin="$repo/target/release/hearsay"
fi
bin="$(cd "$(dirname "$bin")" && pwd)/$(basename "$bin")"
shared="${HEARSAY_SHARED_DATA:-$repo/../shared/data}"

mkdir -p "$out"
out="$(cd "$out" && pwd)"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
ln -s "$repo/corpora-demo" "$work/demo"
corpora="demo"
if [ "$demo_only" = 0 ] && [ -d "$shared/elife-articles/articles" ]; then
  ln -s "$shared/elife-articles/articles" "$work/elife"
  corpora="demo elife"
fi
cd "$work"

# run NAME ARGS...: stdout to NAME, stderr and the exit status to NAME.err (both compared).
run() {
  local name="$1"; shift
  local status=0
  "$bin" "$@" >"$name" 2>"$name.err" || status=$?
  echo "exit $status" >>"$name.err"
}

# Variable names for the pair, path and matrix queries: the causes and effects of the top rows.
names_from_top() {
  python3 -c '
import json, sys
seen = []
for line in open(sys.argv[1]):
    r = json.loads(line)
    for k in ("cause", "effect"):
        v = r.get(k)
        if v and v not in seen:
            seen.append(v)
print("\n".join(seen[: int(sys.argv[2])]))' "$1" "$2"
}

for c in $corpora; do
  o="$out/$c"
  mkdir -p "$o"
  s="--store $c.store"
  # The scan's timing column is the one thing that differs run to run.
  run "$o/scan.table" $s -j2 --format table scan "$c"
  sed -i -E 's/[0-9]+\.[0-9]+ *$/SECONDS/' "$o/scan.table"
  run "$o/rescan.json" $s -j2 --format json scan "$c"
  sed -i -E 's/"seconds":[0-9.e+-]+/"seconds":SECONDS/' "$o/rescan.json"
  run "$o/extract.jsonl" -j2 -q extract "$c"
  run "$o/extract-sentences.jsonl" -j2 -q extract --sentences "$c"
  run "$o/merge.table" --store "$c.merged" -q --format table merge "$o/extract-sentences.jsonl"
  sed -i -E 's/[0-9]+\.[0-9]+ *$/SECONDS/' "$o/merge.table"
  run "$o/merged-top.jsonl" --store "$c.merged" --format json top -n 50

  for f in table json csv; do
    run "$o/top.$f" $s --format $f top -n 30
    run "$o/top-filtered.$f" $s --format $f top -n 20 --min-docs 2 --modality asserted
    run "$o/conflicts.$f" $s --format $f conflicts --limit 20
    run "$o/conflicts-dedupe.$f" $s --format $f conflicts --limit 20 --dedupe
    run "$o/cycles.$f" $s --format $f cycles --limit 20
    run "$o/claims.$f" $s --format $f claims --limit 200
  done
  run "$o/graph-table.txt" $s --format table graph
  for g in graphml gexf dot json csv; do
    run "$o/graph.$g" $s --format $g graph
    run "$o/graph-evidence.$g" $s --format $g graph --evidence --min-docs 2 --weight-by sentences
  done
  run "$o/graph-dedupe.graphml" $s --format graphml graph --dedupe --top 40
  run "$o/graph-o-csv.out" $s --format csv graph -o "$o/graph-file.csv"
  run "$o/graph-o-gexf.out" $s --format gexf graph --evidence -o "$o/graph-file.gexf"
  run "$o/graph-o-table.out" $s --format table graph -o "$o/graph-file.txt"

  top_json="$o/top.json"
  names_from_top "$top_json" 8 >"$c.vars"
  mapfile -t v <"$c.vars"
  if [ "${#v[@]}" -ge 4 ]; then
    for f in table json csv; do
      run "$o/pair-01.$f" $s --format $f pair "${v[0]}" "${v[1]}" --evidence 5
      run "$o/pair-23.$f" $s --format $f pair "${v[2]}" "${v[3]}"
      run "$o/pair-10.$f" $s --format $f pair "${v[1]}" "${v[0]}" --modality hedged
      run "$o/pair-unknown.$f" $s --format $f pair "no such variable here" "${v[0]}"
      run "$o/claims-cause.$f" $s --format $f claims --cause "${v[0]}" --limit 100
      run "$o/claims-var.$f" $s --format $f claims --var "${v[1]}"
      run "$o/paths.$f" $s --format $f paths "${v[0]}" "${v[3]}" --max-hops 4
    done
    run "$o/graph-around.dot" $s --format dot graph --around "${v[0]}" --hops 2
    run "$o/matrix.csv" $s matrix --vars "$c.vars"
    run "$o/matrix-documents.csv" $s matrix --vars "$c.vars" --cell documents
    run "$o/matrix-mentions.csv" $s matrix --vars "$c.vars" --cell mentions -o "$o/matrix-file.csv"
    # A reference diagram and model answers made from the same names (deterministic).
    python3 - "$c.vars" "$c.truth.csv" <<'EOF'
import sys
names = [l.strip() for l in open(sys.argv[1]) if l.strip()]
with open(sys.argv[2], "w") as f:
    f.write("cause,effect\n")
    for a, b in zip(names, names[1:]):
        f.write(f"{a},{b}\n")
EOF
    for f in table json csv; do
      run "$o/score.$f" $s --format $f score --truth "$c.truth.csv" --curve "$o/score-curve.$f.csv"
      run "$o/questions.$f" $s --format $f questions --vars "$c.vars"
    done
    run "$c.questions.csv" $s --format csv questions --vars "$c.vars"
    python3 - "$c.questions.csv" "$c.answers.csv" <<'EOF'
import csv, sys, hashlib
rows = list(csv.DictReader(open(sys.argv[1])))
with open(sys.argv[2], "w", newline="") as f:
    w = csv.writer(f)
    w.writerow(["id", "model", "answer"])
    for r in rows:
        h = hashlib.sha256(r["id"].encode()).digest()
        w.writerow([r["id"], "toy-a", "yes" if h[0] % 2 else "no"])
        w.writerow([r["id"], "toy-b", f"{h[1] / 255:.3f}"])
EOF
    for f in table json csv; do
      for view in summary questions calibration wording pairs; do
        run "$o/compare-$view.$f" $s --format $f compare "$c.answers.csv" --vars "$c.vars" --view $view
      done
    done
    run "$o/report.html" $s report --pair "${v[0]}" "${v[1]}" --compare "$c.answers.csv" --vars "$c.vars"
  fi
  run "$o/report-plain.html" $s report --title "Snapshot"
done

# Commands that read no store.
o="$out/nostore"
mkdir -p "$o"
for f in table json csv; do
  run "$o/explain.$f" --format $f explain "Heavy rain raised the river level, but the dam did not reduce flooding."
  run "$o/explain-none.$f" --format $f explain "The committee met on Tuesday."
  run "$o/patterns-list.$f" --format $f patterns list
done
run "$o/explain-tags.txt" --format table explain --tags "Warmer water may increase algae growth."
run "$o/patterns-check.txt" patterns check
if [ -d "$shared/semeval2010-task8" ]; then
  ln -s "$shared" "$work/shared"
  for f in table json; do
    run "$o/eval-semeval.$f" -j2 --format $f eval --gold "shared/semeval2010-task8/TRAIN_FILE.TXT"
  done
  run "$o/eval-because.json" -j2 --format json eval --gold "shared/because/CongressionalHearings" --gold-format because
  run "$o/eval-semeval-errors.txt" -j2 --format table eval --errors --gold "shared/semeval2010-task8/TRAIN_FILE.TXT"
  run "$o/eval-cnc.json" -j2 --format json eval --gold "shared/causal-news-corpus/train_subtask2.csv" --gold-format cnc
fi
echo "outputs of $bin written to $out"
