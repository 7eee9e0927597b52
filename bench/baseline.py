#!/usr/bin/env python3
"""A plain Python `re` baseline doing extract-like work, for the benchmark's ratio.

For every file: one case-insensitive alternation of the cue literals (word-bounded) runs over the
whole text; each hit takes a fixed window of up to 8 words before it and 8 words after it as
"cause" and "effect", and is printed as one JSON line. No sentence splitting, no span logic: it is
the floor of what a scripted extractor does, not a comparable extractor.

usage: baseline.py CUES_FILE PATH...
"""
import json
import os
import re
import sys

WORD = re.compile(r"\w+")


def files(paths):
    for p in paths:
        if os.path.isdir(p):
            for root, _, names in os.walk(p):
                for n in sorted(names):
                    yield os.path.join(root, n)
        else:
            yield p


def main():
    cues = [l.strip() for l in open(sys.argv[1], encoding="utf-8") if l.strip()]
    cues.sort(key=len, reverse=True)
    # One alternation, grouped by first letter (a one-level trie: `re` tries alternatives in
    # turn, so a flat list of hundreds of literals would be needlessly slow).
    groups = {}
    for c in cues:
        groups.setdefault(c[0].lower(), []).append(c[1:])
    alt = re.compile(r"\b(?:" + "|".join(
        re.escape(k) + "(?:" + "|".join(re.escape(r) for r in rest) + ")"
        for k, rest in sorted(groups.items())) + r")\b", re.I)
    out = sys.stdout
    n = 0
    for path in files(sys.argv[2:]):
        with open(path, encoding="utf-8", errors="replace") as f:
            text = f.read()
        for m in alt.finditer(text):
            before = WORD.findall(text, max(0, m.start() - 120), m.start())[-8:]
            after = WORD.findall(text, m.end(), m.end() + 120)[:8]
            out.write(json.dumps({"path": path, "start": m.start(), "cue": m.group(0),
                                  "cause": " ".join(before), "effect": " ".join(after)}))
            out.write("\n")
            n += 1
    print(f"baseline: {n} hits", file=sys.stderr)


if __name__ == "__main__":
    main()
