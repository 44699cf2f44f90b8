#!/usr/bin/env python3
"""Reference Graver bases for tests/completion_graphs.rs, computed independently with networkx.

The node-arc incidence matrix of a directed graph (one row per node, the column of arc (u, v)
has +1 in row u and -1 in row v) is totally unimodular, so its Graver basis is the set of its
circuits (Sturmfels 1996, Groebner Bases and Convex Polytopes, Prop. 8.11): the signed simple
cycles of the underlying undirected graph, +1 on arcs traversed forward and -1 on arcs traversed
backward, one vector per cycle up to sign.

For seeded random connected digraphs, and for the Petersen graph (networkx
`petersen_graph`, each edge given a seeded random direction), this writes, per graph: the arc list, the incidence
matrix and the cycle vectors (first nonzero entry +1, sorted lexicographically), with the
cycles enumerated by networkx `simple_cycles` on the undirected graph. The digraphs have no
parallel or antiparallel arcs, so the undirected graph is simple. As an independent check the
number of cycles is recounted by brute force over all arc subsets (a subset is a cycle when it
is connected and every node it touches has degree 2).

Usage: python3 scripts/graph_cycles_reference.py   (rewrites tests/fixtures/cycles/*.json)
Only needed to regenerate the fixtures; the Rust tests read the JSON files.
"""

import itertools
import json
import random
from collections import Counter
from pathlib import Path

import networkx as nx

OUT = Path(__file__).resolve().parent.parent / "tests" / "fixtures" / "cycles"

# (seed, nodes, arcs): small to dense, 5-9 nodes, 6-16 arcs.
CASES = [
    (101, 5, 6),
    (102, 5, 8),
    (103, 5, 10),
    (104, 6, 8),
    (105, 6, 11),
    (106, 6, 14),
    (107, 7, 9),
    (108, 7, 13),
    (109, 7, 16),
    (110, 8, 12),
    (111, 8, 15),
    (112, 9, 14),
]


# The Petersen graph: seed of its arc directions.
PETERSEN_SEED = 113


def random_digraph(rng, nodes, arcs):
    """A connected digraph: a random spanning tree plus random extra arcs, random directions."""
    order = list(range(nodes))
    rng.shuffle(order)
    pairs = [(order[i], order[rng.randrange(i)]) for i in range(1, nodes)]
    others = [
        p
        for p in itertools.combinations(range(nodes), 2)
        if p not in {tuple(sorted(q)) for q in pairs}
    ]
    pairs += rng.sample(others, arcs - len(pairs))
    arc_list = [(u, v) if rng.random() < 0.5 else (v, u) for u, v in pairs]
    rng.shuffle(arc_list)
    return arc_list


def petersen_digraph(rng):
    """The Petersen graph's edges, each directed at random, in a random order."""
    arc_list = [(u, v) if rng.random() < 0.5 else (v, u) for u, v in nx.petersen_graph().edges()]
    rng.shuffle(arc_list)
    return arc_list


def incidence(nodes, arc_list):
    rows = [[0] * len(arc_list) for _ in range(nodes)]
    for j, (u, v) in enumerate(arc_list):
        rows[u][j] = 1
        rows[v][j] = -1
    return rows


def oriented(vector):
    first = next(x for x in vector if x != 0)
    return vector if first > 0 else [-x for x in vector]


def cycle_vectors(nodes, arc_list):
    column = {}
    for j, (u, v) in enumerate(arc_list):
        column[(u, v)] = (j, 1)
        column[(v, u)] = (j, -1)
    graph = nx.Graph()
    graph.add_nodes_from(range(nodes))
    graph.add_edges_from(arc_list)
    vectors = []
    for cycle in nx.simple_cycles(graph):
        vector = [0] * len(arc_list)
        for u, v in zip(cycle, cycle[1:] + cycle[:1]):
            j, sign = column[(u, v)]
            vector[j] = sign
        vectors.append(oriented(vector))
    return sorted(vectors)


def brute_force_cycle_count(nodes, arc_list):
    count = 0
    for size in range(3, len(arc_list) + 1):
        for subset in itertools.combinations(arc_list, size):
            degree = Counter(x for arc in subset for x in arc)
            if all(d == 2 for d in degree.values()) and nx.is_connected(nx.Graph(subset)):
                count += 1
    return count


def check(nodes, arc_list, a, vectors):
    for v in vectors:
        assert all(sum(r[j] * v[j] for j in range(len(v))) == 0 for r in a), v
    assert len({tuple(v) for v in vectors}) == len(vectors)
    assert len(vectors) == brute_force_cycle_count(nodes, arc_list)


def to_json(fixture):
    """One key per line and one row per line, so that diffs stay readable."""
    lines = []
    for key, value in fixture.items():
        if isinstance(value, list):
            rows = ",\n".join("  " + json.dumps(row) for row in value)
            lines.append(f' "{key}": [\n{rows}\n ]')
        else:
            lines.append(f" {json.dumps(key)}: {json.dumps(value)}")
    return "{\n" + ",\n".join(lines) + "\n}\n"


def main():
    OUT.mkdir(parents=True, exist_ok=True)
    graphs = [
        (f"graph_n{nodes}_m{arcs}_s{seed}", seed, nodes, random_digraph(random.Random(seed), nodes, arcs))
        for seed, nodes, arcs in CASES
    ]
    petersen = petersen_digraph(random.Random(PETERSEN_SEED))
    graphs.append((f"petersen_s{PETERSEN_SEED}", PETERSEN_SEED, 10, petersen))
    for name, seed, nodes, arc_list in graphs:
        a = incidence(nodes, arc_list)
        vectors = cycle_vectors(nodes, arc_list)
        check(nodes, arc_list, a, vectors)
        fixture = {
            "name": name,
            "generator": f"networkx {nx.__version__} simple_cycles",
            "seed": seed,
            "nodes": nodes,
            "arcs": [list(p) for p in arc_list],
            "incidence": a,
            "cycles": vectors,
        }
        (OUT / f"{name}.json").write_text(to_json(fixture))
        print(f"{name}: {len(vectors)} cycles")


if __name__ == "__main__":
    main()
