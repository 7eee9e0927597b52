#!/usr/bin/env python3
"""Join a sample (SIDE.unlabelled.jsonl, from sample.py) with its hand labels (labels-SIDE.txt)
into SIDE.jsonl, the file the tests read.

Label syntax, one line per sentence, numbered from 0 in sample order:
    N: CAUSE => EFFECT : K P M ; CAUSE => EFFECT : K P M # note
    N: - # note                        (no usable claim)
K: c causal, a association. P: + increase, - decrease, u unsigned, x prevent, 0 none.
M: a asserted, h hedged, n negated, q question, c conditional.

Usage: python3 tests/data/usable/build.py test
"""
import json
import sys
from pathlib import Path

KIND = {"c": "causal", "a": "association"}
POL = {"+": "increase", "-": "decrease", "u": "unsigned", "x": "prevent", "0": "none"}
MOD = {"a": "asserted", "h": "hedged", "n": "negated", "q": "question", "c": "conditional"}


def parse_claim(text: str, where: str) -> dict:
    head, _, tags = text.rpartition(" : ")
    cause, sep, effect = head.partition(" => ")
    k, p, m = tags.split()
    if not sep or not cause.strip() or not effect.strip():
        raise SystemExit(f"{where}: expected CAUSE => EFFECT : K P M, got {text!r}")
    return {"cause": cause.strip(), "effect": effect.strip(), "kind": KIND[k],
            "polarity": POL[p], "modality": MOD[m]}


def main() -> None:
    side = sys.argv[1]
    here = Path(__file__).parent
    rows = [json.loads(l) for l in open(here / f"{side}.unlabelled.jsonl", encoding="utf-8")]
    labels = {}
    for n, line in enumerate(open(here / f"labels-{side}.txt", encoding="utf-8"), 1):
        line = line.strip()
        if not line or line.startswith("#"):
            continue
        where = f"labels-{side}.txt:{n}"
        num, _, rest = line.partition(": ")
        body, _, note = rest.partition(" # ")
        body = body.strip()
        claims = [] if body == "-" else [parse_claim(c.strip(), where) for c in body.split(" ; ")]
        labels[int(num)] = (claims, note.strip())
    missing = [i for i in range(len(rows)) if i not in labels]
    if missing:
        raise SystemExit(f"unlabelled sentences: {missing}")
    with open(here / f"{side}.jsonl", "w", encoding="utf-8") as f:
        for i, r in enumerate(rows):
            claims, note = labels[i]
            r = dict(r, gold=claims, note=note)
            f.write(json.dumps(r, ensure_ascii=False) + "\n")
    n_claims = sum(len(labels[i][0]) for i in range(len(rows)))
    print(f"{side}: {len(rows)} sentences, {n_claims} usable gold claims", file=sys.stderr)


if __name__ == "__main__":
    main()
