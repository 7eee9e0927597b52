#!/usr/bin/env python3
"""Generate patterns/cues/wordnet-verbs.toml from WordNet 3.0.

The signed causal verbs people write most ("improves sleep", "damaged the orchards", "delayed
deliveries") are verbs of change. WordNet groups them in synsets and links each to its
troponyms (the more specific ways of doing it: "double" is a way of "increase"). This script
starts from a few seed synsets, each with the sign it gives its object, walks their troponyms,
and keeps the common transitive verbs among them:

  * common: the verb's sense in that synset was tagged at least MIN_COUNT times in WordNet's
    sense-tagged corpus (cntlist.rev), or it is a seed's own head word;
  * transitive: the synset (or the word) has a frame "Somebody/Something ----s something/
    somebody" (frames 8-11), so "CAUSE verb EFFECT" and "EFFECT verb by CAUSE" are its frames;
  * new: no cue file already has a cue for it;
  * one sign: a verb reached from seeds of opposite signs is left out;
  * not another sense first: the words in OTHER_SENSE_FIRST are usually motion, handling or a
    fixed phrase in general text ("fill in the form", "cut the ribbon") and are left out.

Usage: python3 tools/wordnet-cues.py [/usr/share/wordnet] > patterns/cues/wordnet-verbs.toml
WordNet 3.0 is in the Debian package wordnet-base (its licence is the WordNet 3.0 licence,
reproduced in the generated file's header).
"""
import os
import re
import sys

WN = sys.argv[1] if len(sys.argv) > 1 else "/usr/share/wordnet"

# Seed synsets: (data.verb offset, gloss as a reminder, sign). The sign is what the verb does to
# the amount, level or quality its object names (see the sign rule in patterns/README.md).
SEEDS = [
    ("00153263", "increase: make bigger or more", "increase"),
    ("00441445", "decrease, lessen: make smaller", "decrease"),
    ("00205885", "better, improve, amend: to make better", "increase"),
    ("00208210", "worsen, aggravate: make worse", "increase"),
    ("00258857", "damage: inflict damage upon", "decrease"),
    ("00102586", "harm: cause or do harm to", "decrease"),
    ("00459776", "delay, hold up: cause to be slowed down or delayed", "decrease"),
    ("00317700", "lengthen: make longer", "increase"),
    ("00316768", "shorten: make shorter", "decrease"),
    ("01157535", "consume, deplete, exhaust: use up", "decrease"),
]
# Single synsets named by the task that WordNet reaches only through a lemma: looked up by word.
SEED_WORDS = [
    ("strengthen", "increase"),
    ("weaken", "decrease"),
    ("benefit", "increase"),
    ("hurt", "decrease"),
    ("impair", "decrease"),
    ("deplete", "decrease"),
    ("accelerate", "increase"),
    ("decelerate", "decrease"),
    ("speed up", "increase"),
    ("slow down", "decrease"),
    ("enlarge", "increase"),
    ("expand", "increase"),
    ("shrink", "decrease"),
    ("erode", "decrease"),
    ("degrade", "decrease"),
    ("disrupt", "decrease"),
]
MIN_COUNT = 2
MAX_DEPTH = 2
CHANGE_LEXFILE = 30
TRANSITIVE_FRAMES = {8, 9, 10, 11}

# Common verbs whose first reading in general prose is another sense (motion, handling, a
# fixed phrase) or that take a person rather than an amount as object. They are left out of
# the generated file; a hand-written cue with reject rules is the way to add one.
OTHER_SENSE_FIRST = {
    "fill", "cut", "add", "build up", "confine", "confirm", "cut off", "distill", "purify",
    "round out", "settle", "shake", "straighten out", "exhaust", "hold up", "detain", "stop",
    "check", "arrest", "set back", "break", "tear", "burn", "wound", "injure", "spoil", "ruin",
    "consume", "eat up", "use up", "run through", "wipe out", "drain", "trim", "clip", "crop",
    "prune", "contract", "compress", "condense", "concentrate", "thin", "narrow", "knock", "mar",
    "correct", "fix", "repair", "mend", "restore", "refresh", "tune", "upgrade", "polish",
    "refine", "swell", "inflate", "blow up", "pad", "cushion", "jump", "school", "shoot",
    "take off", "wrinkle", "graze", "hit", "itch", "chafe", "brace", "prepare", "interject",
    "plague", "inflame", "cure", "better", "amend", "advance", "develop", "eat", "extend",
    "stretch", "up", "exasperate", "meliorate", "minify", "multiply", "perfect", "redouble",
}

def read_synsets():
    synsets = {}
    with open(os.path.join(WN, "data.verb"), encoding="latin-1") as f:
        for line in f:
            if line.startswith("  "):
                continue
            data, _, gloss = line.partition("|")
            p = data.split()
            offset, lexfile = p[0], int(p[1])
            n = int(p[3], 16)
            words = [(p[4 + 2 * i].lower(), int(p[5 + 2 * i], 16)) for i in range(n)]
            i = 4 + 2 * n
            pcnt = int(p[i])
            i += 1
            tropo = []
            for _ in range(pcnt):
                sym, off, pos = p[i], p[i + 1], p[i + 2]
                if sym == "~" and pos == "v":
                    tropo.append(off)
                i += 4
            frames = {}
            if i < len(p):
                fcnt = int(p[i])
                i += 1
                for _ in range(fcnt):
                    fnum, wnum = int(p[i + 1]), int(p[i + 2], 16)
                    frames.setdefault(wnum, set()).add(fnum)
                    i += 3
            synsets[offset] = {
                "lexfile": lexfile,
                "words": words,
                "tropo": tropo,
                "frames": frames,
                "gloss": gloss.strip(),
            }
    return synsets


def read_counts():
    counts = {}
    with open(os.path.join(WN, "cntlist.rev"), encoding="latin-1") as f:
        for line in f:
            key, _, cnt = line.split()
            counts[key] = int(cnt)
    return counts


def existing_cue_words(root):
    words = set()
    for name in os.listdir(os.path.join(root, "patterns", "cues")):
        if name == "wordnet-verbs.toml" or not name.endswith(".toml"):
            continue
        with open(os.path.join(root, "patterns", "cues", name), encoding="utf-8") as f:
            for m in re.finditer(r'^pattern = "([^"]*)"', f.read(), re.M):
                lits = [t.rstrip("~+") for t in m.group(1).split() if t not in ("CAUSE", "EFFECT")]
                lits = [t for t in lits if t not in (",", ";", "by")]
                if lits:
                    words.add(" ".join(lits))
    return words


def third_person(verb):
    head, _, rest = verb.partition(" ")
    if re.search(r"(s|sh|ch|x|z)$", head):
        head += "es"
    elif re.search(r"[^aeiou]y$", head):
        head = head[:-1] + "ies"
    else:
        head += "s"
    return (head + " " + rest).strip()


# Example pairs by sign: (cause, effect) written so the claim reads naturally for any verb of
# that sign; rotated over the verbs.
EXAMPLES = {
    "increase": [
        ("the new timetable", "the waiting time"),
        ("the warm spell", "the tourist season"),
        ("the reform", "the pension fund"),
        ("the coaching scheme", "pupil attainment"),
    ],
    "decrease": [
        ("the drought", "the harvest"),
        ("the roadworks", "the bus service"),
        ("the late frost", "the orchard yield"),
        ("the strike", "the ferry timetable"),
    ],
}


def main():
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    syn = read_synsets()
    counts = read_counts()
    have = existing_cue_words(root)
    index = {}
    for off, s in syn.items():
        for w, _ in s["words"]:
            index.setdefault(w.replace("_", " "), []).append(off)

    found = {}  # verb -> {sign: (seed gloss, offset, count)}

    def visit(off, sign, seed, depth, from_seed_word=None):
        s = syn[off]
        for wnum, (w, lexid) in enumerate(s["words"], start=1):
            verb = w.replace("_", " ")
            if from_seed_word and verb != from_seed_word and depth == 0:
                continue
            key = "%s%%2:%02d:%02d::" % (w, s["lexfile"], lexid)
            cnt = counts.get(key, 0)
            frames = s["frames"].get(0, set()) | s["frames"].get(wnum, set())
            if not frames & TRANSITIVE_FRAMES:
                continue
            if not re.fullmatch(r"[a-z]+( (up|down|out|off))?", verb):
                continue
            if cnt < MIN_COUNT and depth > 0:
                continue
            # Troponyms must themselves be verbs of change (WordNet's lexicographer file
            # verb.change, number 30): other files hold contact, motion and body senses.
            if depth > 0 and s["lexfile"] != CHANGE_LEXFILE:
                continue
            found.setdefault(verb, {}).setdefault(sign, (seed, off, cnt))
        if depth < MAX_DEPTH:
            for t in s["tropo"]:
                visit(t, sign, seed, depth + 1)

    for off, gloss, sign in SEEDS:
        visit(off, sign, gloss, 0)
    for word, sign in SEED_WORDS:
        offs = index.get(word, [])
        # The word's most frequent transitive sense in the tagged corpus.
        best = None
        for off in offs:
            s = syn[off]
            for wnum, (w, lexid) in enumerate(s["words"], start=1):
                if w.replace("_", " ") != word:
                    continue
                frames = s["frames"].get(0, set()) | s["frames"].get(wnum, set())
                if not frames & TRANSITIVE_FRAMES:
                    continue
                cnt = counts.get("%s%%2:%02d:%02d::" % (w, s["lexfile"], lexid), 0)
                if best is None or cnt > best[1]:
                    best = (off, cnt)
        if best:
            visit(best[0], sign, "%s: %s" % (word, syn[best[0]]["gloss"].split(";")[0]), 0, word)

    keep = []
    for verb in sorted(found):
        signs = found[verb]
        if len(signs) != 1:
            continue
        if verb in have or verb.replace(" ", "-") in have:
            continue
        if verb in OTHER_SENSE_FIRST:
            continue
        sign, (seed, off, cnt) = next(iter(signs.items()))
        keep.append((verb, sign, seed, off, cnt))
        # WordNet spells -ize; British -ise ("minimise") is its own cue.
        head, _, rest = verb.partition(" ")
        if head.endswith("ize"):
            brit = (head[:-3] + "ise" + ((" " + rest) if rest else ""))
            if brit not in have and brit not in found:
                keep.append((brit, sign, seed, off, cnt))
    keep.sort()

    out = sys.stdout
    out.write(HEADER)
    for n, (verb, sign, seed, off, cnt) in enumerate(keep):
        pattern_verb = " ".join([verb.split()[0] + "~"] + verb.split()[1:])
        cid = verb.replace(" ", "-")
        c, e = EXAMPLES[sign][n % len(EXAMPLES[sign])]
        active = "%s %s %s." % (c[0].upper() + c[1:], third_person(verb), e)
        note = "WordNet 3.0 synset %s (%s); tagged-corpus count %d." % (off, seed, cnt)
        # A glued compound ("double-stranded", "harm-reduction") is an adjective or a noun.
        counter = "The %s-related costs were small." % verb.split()[0]
        out.write(CUE.format(id=cid, pattern="CAUSE %s EFFECT" % pattern_verb, sign=sign,
                             text=active, cause=c, effect=e, note=note, counter=counter,
                             reject_before=REJECT_BEFORE))
    for n, (verb, sign, seed, off, cnt) in enumerate(keep):
        pattern_verb = " ".join([verb.split()[0] + "~"] + verb.split()[1:])
        cid = verb.replace(" ", "-") + "-by"
        c, e = EXAMPLES[sign][(n + 1) % len(EXAMPLES[sign])]
        head, _, rest = verb.partition(" ")
        part = past_participle(head) + ((" " + rest) if rest else "")
        text = "%s was %s by %s." % (e[0].upper() + e[1:], part, c)
        note = "Passive with an agent; WordNet 3.0 synset %s." % off
        out.write(CUE_BY.format(id=cid, pattern="EFFECT %s by CAUSE" % pattern_verb, sign=sign,
                                text=text, cause=c, effect=e, note=note))


IRREGULAR = {}


def load_irregular(root):
    with open(os.path.join(root, "patterns", "irregular-verbs.tsv"), encoding="utf-8") as f:
        for line in f:
            if line.startswith("#") or not line.strip():
                continue
            p = line.rstrip("\n").split("\t")
            if len(p) >= 3:
                IRREGULAR[p[0]] = p[2]


def past_participle(v):
    if v in IRREGULAR:
        return IRREGULAR[v]
    if v.endswith("e"):
        return v + "d"
    if re.search(r"[^aeiou]y$", v):
        return v[:-1] + "ied"
    if re.search(r"[^aeiou][aeiou][bdgmnpt]$", v) and len(v) <= 4:
        return v + v[-1] + "ed"
    return v + "ed"


REJECT_BEFORE = r"""(?i)(?:^|[.!?]["\x27”’)]*\s*|\b(?:a|an|the|its|their|his|her|our|my|your|any|no|each|every|some|further|recent|overall|major|minor|net)\s*|\d%?\s*|\w\x27s\s*)$"""

HEADER = """# Cue patterns generated from WordNet 3.0: common transitive verbs of change and their
# troponyms, each with the sign it gives its object. DO NOT EDIT BY HAND: edit
# tools/wordnet-cues.py and regenerate with
#   python3 tools/wordnet-cues.py > patterns/cues/wordnet-verbs.toml
# Verbs already in another cue file are left out here; the hand-written cue wins.
# Sign rule for evaluative verbs (improve, benefit, damage, harm, impair): the sign is what the
# verb does to the amount or quality its object names: improve/benefit -> increase,
# damage/harm/impair -> decrease (see patterns/README.md, "Signs").
#
# WordNet 3.0 Copyright 2006 by Princeton University. All rights reserved.
# Licence (WordNet 3.0 licence): Permission to use, copy, modify and distribute this software and
# database and its documentation for any purpose and without fee or royalty is hereby granted,
# provided that you agree to comply with the following copyright notice and statements,
# including the disclaimer, and that the same appear on ALL copies of the software, database and
# documentation, including modifications that you make for internal use or for distribution.
# THIS SOFTWARE AND DATABASE IS PROVIDED "AS IS" AND PRINCETON UNIVERSITY MAKES NO
# REPRESENTATIONS OR WARRANTIES, EXPRESS OR IMPLIED. BY WAY OF EXAMPLE, BUT NOT LIMITATION,
# PRINCETON UNIVERSITY MAKES NO REPRESENTATIONS OR WARRANTIES OF MERCHANTABILITY OR FITNESS FOR
# ANY PARTICULAR PURPOSE OR THAT THE USE OF THE LICENSED SOFTWARE, DATABASE OR DOCUMENTATION
# WILL NOT INFRINGE ANY THIRD PARTY PATENTS, COPYRIGHTS, TRADEMARKS OR OTHER RIGHTS.
# The name of Princeton University or Princeton may not be used in advertising or publicity
# pertaining to distribution of the software and/or database. Title to copyright in this
# software, database and any associated documentation shall at all times remain with Princeton
# University and LICENSEE agrees to preserve same.
"""

CUE = """
[[cue]]
id = "wn-{id}"
family = "wordnet-{sign}"
pattern = "{pattern}"
kind = "causal"
polarity = "{sign}"
reject_before = '{reject_before}'
reject_after = '(?i)^(?:\\s*by\\b|-)'
examples = [
  {{ text = "{text}", cause = "{cause}", effect = "{effect}", polarity = "{sign}" }},
]
counter_examples = ["{counter}"]
note = "{note}"
"""

CUE_BY = """
[[cue]]
id = "wn-{id}"
family = "wordnet-{sign}"
pattern = "{pattern}"
kind = "causal"
polarity = "{sign}"
examples = [
  {{ text = "{text}", cause = "{cause}", effect = "{effect}", polarity = "{sign}" }},
]
note = "{note}"
"""

if __name__ == "__main__":
    load_irregular(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    main()
