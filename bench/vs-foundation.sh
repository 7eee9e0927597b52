#!/usr/bin/env bash
# Side-by-side throughput of `extract -j1` against an earlier commit (default: 12ce4b6, the
# foundation release), as the quality issue asks: both binaries alternate over the same files,
# N runs each, and the median user-CPU seconds and their ratio are printed.
#   bench/vs-foundation.sh [CORPUS_DIR] [--runs N] [--base COMMIT]
set -euo pipefail
cd "$(dirname "$0")/.."
corpus=../shared/data/elife-articles/articles
runs=5
base=12ce4b6
while [ $# -gt 0 ]; do
  case "$1" in
    --runs) runs=$2; shift 2 ;;
    --base) base=$2; shift 2 ;;
    *) corpus=$1; shift ;;
  esac
done
[ -x /usr/bin/time ] || (apt-get update -qq && apt-get install -y -qq time)
work=$(mktemp -d)
trap 'git worktree remove --force "$work/base" >/dev/null 2>&1 || true; rm -rf "$work"' EXIT
git worktree add --detach "$work/base" "$base" >/dev/null
(cd "$work/base" && CARGO_TARGET_DIR="$work/target" cargo build --release --quiet)
cargo build --release --quiet
cp "$work/target/release/hearsay" "$work/hearsay-base"
cp target/release/hearsay "$work/hearsay-now"
for i in $(seq "$runs"); do
  for b in base now; do
    /usr/bin/time -f "%U" -a -o "$work/$b.times" "$work/hearsay-$b" -q extract -j1 "$corpus" >/dev/null
  done
done
median() { sort -n "$1" | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}'; }
b=$(median "$work/base.times"); n=$(median "$work/now.times")
echo "extract -j1 over $corpus, $runs runs each, median user CPU: $base ${b}s, now ${n}s"
python3 -c "print(f'ratio now/base: {$n/$b:.2f} (throughput change: {($b/$n-1)*100:+.0f}%)')"
