#!/usr/bin/env python3
"""Draw the labelled samples of eLife sentences from `hearsay extract` output.

Usage (from the repository root):
    hearsay -q extract -j2 ../shared/data/elife-articles/articles > /tmp/elife-claims.jsonl
    python3 tests/data/usable/sample.py /tmp/elife-claims.jsonl ../shared/data/elife-articles/articles

Claims are drawn uniformly at random (Python's random.Random(SEED)); each drawn claim's sentence
is kept once. Articles whose number is even go to the test sample, odd ones to the training
sample, so the two never share an article. Writes test.unlabelled.jsonl and train.unlabelled.jsonl
beside this script: document, byte range of the sentence, the sentence and the one before it.
The extractor's claims are not written, so labelling starts from the sentence alone.
"""
import json
import random
import re
import sys
from pathlib import Path

SEED = 20261204
TEST_SENTENCES = 130
TRAIN_SENTENCES = 160


def previous_sentence(text: str, start: int) -> str:
    """The sentence before byte `start` in its paragraph (a plain split on '. ', for context)."""
    before = text.encode()[:start].decode(errors="ignore")
    para = before.rsplit("\n", 1)[-1].rstrip()
    if not para:
        return ""
    parts = re.split(r"(?<=[.!?])\s+(?=[A-Z(])", para)
    return parts[-1] if parts else ""


def main() -> None:
    claims_path, articles = sys.argv[1], Path(sys.argv[2])
    claims = [json.loads(line) for line in open(claims_path, encoding="utf-8")]
    rng = random.Random(SEED)
    order = list(range(len(claims)))
    rng.shuffle(order)
    seen = set()
    out = {"test": [], "train": []}
    want = {"test": TEST_SENTENCES, "train": TRAIN_SENTENCES}
    texts = {}
    for i in order:
        c = claims[i]
        src = c["source"]
        doc = Path(src["path"]).stem
        key = (doc, src["start"])
        if key in seen:
            continue
        seen.add(key)
        side = "test" if int(doc.removeprefix("elife")) % 2 == 0 else "train"
        if len(out[side]) >= want[side]:
            if all(len(out[s]) >= want[s] for s in out):
                break
            continue
        if doc not in texts:
            texts[doc] = (articles / f"{doc}.txt").read_text(encoding="utf-8")
        text = texts[doc]
        sentence = text.encode()[src["start"]:src["end"]].decode()
        out[side].append({
            "doc": doc,
            "path": f"articles/{doc}.txt",
            "start": src["start"],
            "end": src["end"],
            "previous": previous_sentence(text, src["start"]),
            "sentence": sentence,
        })
    here = Path(__file__).parent
    for side, rows in out.items():
        with open(here / f"{side}.unlabelled.jsonl", "w", encoding="utf-8") as f:
            for r in rows:
                f.write(json.dumps(r, ensure_ascii=False) + "\n")
        print(side, len(rows), file=sys.stderr)


if __name__ == "__main__":
    main()
