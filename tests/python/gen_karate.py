"""Reference values for the friend vote: Zachary's karate club graph (Zachary 1977, "An
Information Flow Model for Conflict and Fission in Small Groups"), as networkx ships it
(karate_club_graph, with edge weights and each member's faction in the "club"
attribute).

For each member, the faction is predicted from the neighbours' factions alone: the
member's own label is removed and networkx's harmonic function (Zhu, Ghahramani &
Lafferty 2003) is run with every other member labelled. With one unlabelled node, the
harmonic function is exactly the weighted-vote relational neighbour (Macskassy &
Provost 2007): the node's class scores are its neighbours' classes weighted by edge
weight and divided by its weighted degree. telltale's relational_neighbour must give
the same predictions (tests/karate_reference.rs).

Usage: gen_karate.py OUT.json
"""
import json
import sys

import networkx as nx
from networkx.algorithms import node_classification


def main():
    g = nx.karate_club_graph()
    factions = sorted({g.nodes[n]["club"] for n in g})
    predictions = []
    for n in g:
        h = g.copy()
        for m in h:
            if m == n:
                h.nodes[m].pop("label", None)
            else:
                h.nodes[m]["label"] = h.nodes[m]["club"]
        predictions.append(node_classification.harmonic_function(h)[n])
    correct = sum(p == g.nodes[n]["club"] for n, p in zip(g, predictions))
    out = {
        "source": f"networkx {nx.__version__} karate_club_graph (Zachary 1977); "
        "leave-one-out harmonic_function",
        "factions": factions,
        "nodes": len(g),
        "club": [g.nodes[n]["club"] for n in g],
        "edges": [[u, v, g.edges[u, v].get("weight", 1)] for u, v in g.edges()],
        "predicted": predictions,
        "correct": correct,
        "accuracy": correct / len(g),
    }
    with open(sys.argv[1], "w", encoding="utf-8") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
