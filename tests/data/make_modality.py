import json, itertools
pairs = [("fertiliser runoff","algal blooms"),("the drought","crop failures"),("road salt","corrosion of the bridge"),
("the new levy","higher ferry fares"),("poor drainage","flooding in the lower town"),("the quarry blasts","cracks in the chapel walls"),
("late frosts","smaller apple harvests"),("the night shift","sleep loss among nurses"),("the harbour dredging","murky water"),
("the bakery strike","bread shortages"),("the faulty valve","pressure drops"),("warmer winters","more ticks on the moor"),
("the bypass","less traffic in the square"),("the school meals scheme","better attendance"),("the loose gravel","falls among cyclists"),
("the mill closure","job losses in the valley"),("heavy grazing","soil erosion"),("the storm surge","damage to the sea wall"),
("the beetle outbreak","tree deaths in the plantation"),("cheap fuel","longer commutes")]
items = []
import re
PLURAL = {"fertiliser runoff":0}
def plural(c): 
    w=c.split()[-1]; return w.endswith("s") and not w.endswith("ss")
def agree(sent, c):
    if not plural(c): return sent
    for a,b in [(" causes "," cause "),(" does not "," do not "),("Does ","Do "),(" is "," are "),(" has "," have "),("Has ","Have "),(" was "," were "),(" appears "," appear "),(" probably causes "," probably cause ")]:
        sent=sent.replace(c+a, c+b).replace(cap(c)+a, cap(c)+b)
        if a.strip() in ("Does","Has") : sent=sent.replace(a+c, b+c)
    sent=sent.replace(c+" never causes", c+" never cause").replace(cap(c)+" never causes", cap(c)+" never cause")
    sent=sent.replace("that "+c+" causes", "that "+c+" cause")
    return sent
def add(sent, c, e, mod, kind="causal"):
    sent = agree(sent, c)
    items.append({"sentence": sent, "claims": [{"cause": c, "effect": e, "kind": kind, "modality": mod}]})
def cap(s): return s[0].upper()+s[1:]
asserted = ["{c} causes {e}.", "{c} led to {e}.", "{c} has caused {e}.", "{e} was caused by {c}.", "{c} resulted in {e}."]
hedged = ["{c} may cause {e}.", "{c} might lead to {e}.", "{c} could cause {e}.", "{c} probably causes {e}.",
          "{c} is likely to cause {e}.", "We suspect that {c} causes {e}.", "{c} possibly led to {e}.", "{c} appears to cause {e}."]
negated = ["{c} does not cause {e}.", "{c} did not lead to {e}.", "{c} never causes {e}.", "{c} has not caused {e}.",
           "There is no evidence that {c} causes {e}.", "{c} did not cause {e}."]
question = ["Does {c} cause {e}?", "Did {c} lead to {e}?", "Could {c} cause {e}?", "Can {c} cause {e}?", "Has {c} caused {e}?"]
cond = ["If it continues, {c} will cause {e}.", "{c} would cause {e} if the council did nothing.", "If left unchecked, {c} causes {e}.",
        "Unless the pumps are fixed, {c} will lead to {e}.", "{c} could lead to {e} if the weather holds."]
assoc = ["{c} is associated with {e}.", "{c} is linked to {e}.", "{c} is correlated with {e}.", "{c} was associated with {e}."]
assoc_hedged = ["{c} may be associated with {e}.", "{c} might be linked to {e}."]
for i,(c,e) in enumerate(pairs):
    add(cap(asserted[i%len(asserted)].format(c=c,e=e)) if not asserted[i%len(asserted)].startswith("{e}") else cap(asserted[i%len(asserted)].format(c=c,e=e)), c, e, "asserted")
for i,(c,e) in enumerate(pairs):
    t = hedged[i%len(hedged)]; add(cap(t.format(c=c,e=e)) if t.startswith("{") else t.format(c=c,e=e), c, e, "hedged")
for i,(c,e) in enumerate(pairs):
    t = hedged[(i+3)%len(hedged)]; s=t.format(c=c,e=e); add(cap(s), c, e, "hedged")
for i,(c,e) in enumerate(pairs):
    t = negated[i%len(negated)]; add(cap(t.format(c=c,e=e)), c, e, "negated")
for i,(c,e) in enumerate(pairs):
    t = negated[(i+2)%len(negated)]; add(cap(t.format(c=c,e=e)), c, e, "negated")
for i,(c,e) in enumerate(pairs):
    t = question[i%len(question)]; add(t.format(c=c,e=e), c, e, "question")
for i,(c,e) in enumerate(pairs):
    t = cond[i%len(cond)]; add(cap(t.format(c=c,e=e)), c, e, "conditional")
for i,(c,e) in enumerate(pairs):
    t = assoc[i%len(assoc)]; add(cap(t.format(c=c,e=e)), c, e, "asserted", "association")
for i,(c,e) in enumerate(pairs[:10]):
    t = assoc_hedged[i%len(assoc_hedged)]; add(cap(t.format(c=c,e=e)), c, e, "hedged", "association")
# fix capitalised spans: cause text must be a substring
out=["# INVENTED DATA: sentences written for hearsay's modality tests (not from any corpus); see README.md beside this file."]
for n,it in enumerate(items):
    s=it["sentence"]
    for cl in it["claims"]:
        for k in ("cause","effect"):
            if cl[k] not in s: cl[k]=cap(cl[k])
            assert cl[k] in s, (s, cl[k])
    it={"id":f"m{n+1:03}", **it}
    out.append(json.dumps(it))
open("tests/data/modality.jsonl","w").write("\n".join(out)+"\n")
print(len(items))
