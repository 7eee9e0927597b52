"""Draw the variable phrases of the head/qualifier sample.

Run from the repository root after a debug build:
    python3 tests/data/heads/draw.py target/debug/hearsay > candidates.tsv
Three sources, each drawn with a fixed seed:
- BECAUSE (CongressionalHearings): the annotated Cause and Effect spans of at most 10 words;
- SemEval-2010 Task 8 (training split): the cause and effect phrases `hearsay extract` finds in
  the 1003 Cause-Effect sentences (markup removed);
- eLife: the cause and effect phrases `hearsay extract` finds in 25 seeded articles.
Phrases are the input heads.rs sees in use: spans of claims. They are labelled by hand afterwards.
"""
import json, os, random, re, subprocess, sys, tempfile

DATA = os.environ.get("HEARSAY_SHARED_DATA", os.path.join(os.path.dirname(__file__), "../../../../shared/data"))
BIN = sys.argv[1]

def extract(paths):
    out = subprocess.run([BIN, "extract", *paths], capture_output=True, text=True, check=True).stdout
    for line in out.splitlines():
        c = json.loads(line)
        for side in ("cause", "effect"):
            yield c[side]["text"]

def because():
    d = os.path.join(DATA, "because/CongressionalHearings")
    spans = []
    for name in sorted(os.listdir(d)):
        if not name.endswith(".ann"):
            continue
        roles = set()
        lines = open(os.path.join(d, name), encoding="utf-8").read().splitlines()
        for l in lines:
            if l.startswith("E"):
                for part in l.split("\t")[1].split()[1:]:
                    role, t = part.split(":")
                    if role.startswith(("Cause", "Effect")):
                        roles.add(t)
        for l in lines:
            cols = l.split("\t")
            if l.startswith("T") and cols[0] in roles and len(cols) == 3:
                if 1 <= len(cols[2].split()) <= 10:
                    spans.append(cols[2])
    return sorted(set(spans))

def semeval():
    text = open(os.path.join(DATA, "semeval2010-task8/TRAIN_FILE.TXT"), encoding="utf-8").read()
    blocks = text.strip().split("\n\n")
    sents = []
    for b in blocks:
        lines = b.splitlines()
        if len(lines) >= 2 and lines[1].startswith("Cause-Effect"):
            s = lines[0].split("\t", 1)[1].strip('"')
            sents.append(re.sub(r"</?e[12]>", "", s))
    with tempfile.TemporaryDirectory() as tmp:
        p = os.path.join(tmp, "semeval.txt")
        open(p, "w").write("\n\n".join(sents) + "\n")
        return sorted(set(extract([p])))

def elife():
    d = os.path.join(DATA, "elife-articles/articles")
    names = sorted(os.listdir(d))
    random.Random(7).shuffle(names)
    return sorted(set(extract([os.path.join(d, n) for n in names[:25]])))

print("source\tphrase")
for src, items, n in (("because", because(), 60), ("semeval", semeval(), 70), ("elife", elife(), 90)):
    random.Random(2003).shuffle(items)
    for p in items[:n]:
        print(f"{src}\t{p}")
