"""The Davis Southern Women affiliation network (Davis, Gardner & Gardner 1941, "Deep
South"), as networkx ships it, with the two-group split the Rust test checks against.

Which events each woman attended comes from networkx.davis_southern_women_graph().
Women are written by number (1-18, networkx's order, which is the order of the original
table) rather than by name.

The split: Davis, Gardner and Gardner put women 1-9 in one group and 9-18 in the other
(woman 9 in both), with women 8, 9, 10, 16, 17 and 18 as secondary members; so
Freeman (2003), "Finding social groups: a meta-analysis of the southern women data",
reports it (found with a search of his paper's slides). Freeman's consensus over 21
analyses is women 1-9 against 10-18, with women 8, 9 and 16 the ones the analyses
disagree about (from memory); those three are left out of the check.

The Rust test tests/cohort_reference.rs infers each woman's group from the events she
attended, with statistics counted from the other 17 women only (leave-one-out).

Usage: python gen_davis.py OUT.json
"""
import json
import sys

import networkx as nx

G = nx.davis_southern_women_graph()
women = list(G.graph["top"])
events = list(G.graph["bottom"])
attended = [sorted(events.index(e) for e in G[w]) for w in women]

out = {
    "source": f"networkx {nx.__version__} davis_southern_women_graph (Davis, Gardner & Gardner 1941)",
    "events": len(events),
    "attended": attended,
    "split": {
        "note": "DGG 1941 as reported by Freeman 2003: women 1-9 vs 10-18; ambiguous 8, 9, 16 from memory of Freeman's consensus",
        "group_one": list(range(1, 10)),
        "group_two": list(range(10, 19)),
        "ambiguous": [8, 9, 16],
    },
}
with open(sys.argv[1] if len(sys.argv) > 1 else "tests/data/davis.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
