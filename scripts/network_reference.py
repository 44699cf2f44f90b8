#!/usr/bin/env python3
"""Writes tests/fixtures/network/lanes_6x30.json: a lanes-like network with 40 days of optima.

Usage: python3 scripts/network_reference.py [output directory]   (needs `pip install highspy`)

The network is invented: 6 depots serve 30 zones, each zone over 3 or 4 lanes from distinct
depots, each lane with a capacity; surplus stays at a depot at a keeping cost. The matrix has
the layout of the `lanes` scenario kind (src/scenario/compile.rs): columns lane 0..L then kept
0..D; rows supply 0..D then demand 0..Z; a lane has +1 in its depot's and its zone's row, a
kept column +1 in its depot's row. Bounds are 0 <= lane <= capacity and kept >= 0.

Each day starts from the day before and changes, by its `change` field: the demands of 2 or 3
zones (`demand`), the costs of 4 lanes (`cost`), both (`mixed`), or one zone's demand beyond
the capacity of its lanes (`spike`, infeasible; the next day restores it). For each day HiGHS
solves min cost.x, A x = rhs, bounds, x integer, and the fixture records the status and the
optimal objective. The output is deterministic (fixed seed).
"""

import json
import os
import random
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import fixtures_highs as highs  # noqa: E402

SEED = 1406
DEPOTS, ZONES, DAYS = 6, 30, 40
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tests", "fixtures", "network")


def network(rng):
    lanes = []
    for z in range(ZONES):
        for d in sorted(rng.sample(range(DEPOTS), rng.choice([3, 4]))):
            lanes.append({"depot": d, "zone": z, "capacity": rng.randint(8, 30)})
    cols = len(lanes) + DEPOTS
    matrix = [[0] * cols for _ in range(DEPOTS + ZONES)]
    for j, lane in enumerate(lanes):
        matrix[lane["depot"]][j] = 1
        matrix[DEPOTS + lane["zone"]][j] = 1
    for d in range(DEPOTS):
        matrix[d][len(lanes) + d] = 1
    return lanes, matrix


def days(rng, lanes):
    demand = [rng.randint(5, 20) for _ in range(ZONES)]
    supply = [0] * DEPOTS
    for z in range(ZONES):
        supply[rng.randrange(DEPOTS)] += 25
    cost = [rng.randint(1, 12) for _ in lanes] + [rng.randint(0, 3) for _ in range(DEPOTS)]
    room = [sum(lane["capacity"] for lane in lanes if lane["zone"] == z) for z in range(ZONES)]
    restore = None
    out = []
    for k in range(DAYS):
        if restore is not None:
            zone, value = restore
            demand[zone] = value
            restore = None
            change = "demand"
        elif k == 0:
            change = "first"
        else:
            change = rng.choice(["demand"] * 5 + ["cost"] * 2 + ["mixed"] * 2 + ["spike"])
        if change in ("demand", "mixed") and k > 0:
            for z in rng.sample(range(ZONES), rng.choice([2, 3])):
                demand[z] = max(0, demand[z] + rng.randint(-4, 4))
        if change in ("cost", "mixed"):
            for j in rng.sample(range(len(lanes)), 4):
                cost[j] = max(1, cost[j] + rng.randint(-3, 3))
        if change == "spike":
            zone = rng.randrange(ZONES)
            restore = (zone, demand[zone])
            demand[zone] = room[zone] + rng.randint(1, 5)
        out.append({"id": f"day-{k:02}", "change": change, "rhs": supply + demand, "cost": list(cost)})
    return out


def main():
    out_dir = sys.argv[1] if len(sys.argv) > 1 else OUT
    rng = random.Random(SEED)
    lanes, matrix = network(rng)
    lower = [0] * len(matrix[0])
    upper = [lane["capacity"] for lane in lanes] + [None] * DEPOTS
    records = []
    for day in days(rng, lanes):
        status, objective, raw = highs.solve(matrix, day["rhs"], day["cost"], lower, upper)
        day["expect"] = {"status": status, "objective": objective}
        day["highs_status"] = raw
        records.append(day)
    fixture = {
        "name": "lanes_6x30",
        "source": f"HiGHS {highs.version()} via highspy, scripts/network_reference.py",
        "seed": SEED,
        "depots": DEPOTS,
        "zones": ZONES,
        "lanes": [[lane["depot"], lane["zone"]] for lane in lanes],
        "matrix": matrix,
        "lower": lower,
        "upper": upper,
        "days": records,
    }
    os.makedirs(out_dir, exist_ok=True)
    path = os.path.join(out_dir, "lanes_6x30.json")
    with open(path, "w") as f:
        json.dump(fixture, f, separators=(",", ":"))
        f.write("\n")
    statuses = [d["expect"]["status"] for d in records]
    print(f"{path}: {len(records)} days, {statuses.count('infeasible')} infeasible")


if __name__ == "__main__":
    main()
