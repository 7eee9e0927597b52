#!/usr/bin/env bash
# The hearsay benchmark: one command from a fresh clone.
#   bench/run.sh [CORPUS_DIR] [--out FILE] [--runs N]
# Builds in release mode, then measures extract, scan, re-scans, pair queries, ripgrep and a
# Python `re` baseline over the same files (default: ../shared/data/elife-articles/articles),
# and extract, ripgrep and the baseline over a sparse corpus beside it (--sparse DIR, default
# ../shared/data/general-text/docs; see the SOURCE.txt beside each corpus).
# The corpus is copied into a temporary folder first; the original is never modified.
set -euo pipefail
cd "$(dirname "$0")/.."
command -v rg >/dev/null || (apt-get update -qq && apt-get install -y -qq ripgrep)
[ -x /usr/bin/time ] || (apt-get update -qq && apt-get install -y -qq time)
cargo build --release --quiet
exec python3 bench/bench.py "$@"
