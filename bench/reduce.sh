#!/usr/bin/env bash
# The distributed reduce, measured: `link` of N part stores against `merge` of N extract shards.
#   bench/reduce.sh [--parts N] [--out FILE] [--keep DIR] [--bin PATH]
# Builds in release mode, writes N copies of the eLife articles as N JSON Lines dumps (one copy a
# part, distinct ids), scans each dump into a part store and extracts it into a shard (as N
# cluster tasks would, one after the other here), then times `link` of the parts and `merge` of
# the shards (wall time, peak RSS) and writes bench/results/reduce-<N>-parts.json.
# Needs free disk: about 230 MB a part (store, shard and dump).
set -euo pipefail
cd "$(dirname "$0")/.."
[ -x /usr/bin/time ] || (apt-get update -qq && apt-get install -y -qq time)
cargo build --release --quiet
exec python3 bench/reduce.py "$@"
