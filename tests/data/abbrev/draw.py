"""Draw the candidate parentheses of the abbreviation sample from the shared eLife articles.

Run from the repository root: python3 tests/data/abbrev/draw.py > candidates.tsv
Deterministic: a fixed seed over a sorted list of files. Each row is one parenthesis in its
sentence (approximate sentence bounds: '. ' followed by a capital); the labeller then adds the
columns `is_definition`, `short` and `long` by reading the sentence.
"""
import os, random, re, sys

DATA = os.environ.get("HEARSAY_SHARED_DATA", os.path.join(os.path.dirname(__file__), "../../../../shared/data"))
ROOT = os.path.join(DATA, "elife-articles/articles")
SEED = 20031
N = 520
SKIP = re.compile(r"^(fig|figure|table|video|supplementary|equation|eq\.|see|e\.g|i\.e|ref|reviewed)", re.I)
YEAR = re.compile(r"\b(19|20)\d\d\b")

def sentences(line):
    start = 0
    for m in re.finditer(r"(?<=[.!?])\s+(?=[A-Z])", line):
        yield line[start:m.start()]
        start = m.end()
    yield line[start:]

def main():
    cands = []
    for name in sorted(os.listdir(ROOT)):
        with open(os.path.join(ROOT, name), encoding="utf-8") as f:
            lines = f.read().split("\n")[1:]
        for line in lines:
            for sent in sentences(line):
                if len(sent) > 600 or "\t" in sent:
                    continue
                for m in re.finditer(r"\(([^()]*)\)", sent):
                    inner = re.split(r"[;,]", m.group(1))[0].strip()
                    if not inner or not re.search(r"[A-Za-z]", inner):
                        continue
                    if len(inner.split()) > 6 or SKIP.match(inner) or YEAR.search(m.group(1)) or "et al" in m.group(1):
                        continue
                    cands.append((name[:-4], len(sent[:m.start()].encode("utf-8")), sent))
    random.Random(SEED).shuffle(cands)
    print(f"# frame: {len(cands)} candidate parentheses", file=sys.stderr)
    print("id\tdoc\tparen_at\tsentence")
    for i, (doc, at, sent) in enumerate(sorted(cands[:N], key=lambda c: (c[0], c[1]))):
        print(f"{i + 1}\t{doc}\t{at}\t{sent}")

main()
