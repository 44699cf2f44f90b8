"""Random feasible days for the example scenarios, shared by the benchmarks.

Each day is a random plan inside the scenario's limits and the numbers it satisfies, so every
drawn day is feasible; the benchmarks draw them with a fixed seed, in the order of SCENARIOS.
"""

SCENARIOS = ["brackle_lanes.toml", "vell_valley.toml", "hollin_trucks.toml"]


def lane_names(s):
    return [f"{l['from']}->{l['to']}" for l in s["lanes"]]


def draw_day(s, rng, label):
    """One feasible day: a random plan inside the limits, and the numbers it satisfies."""
    lanes = lane_names(s)
    day = {"day": label}
    if s["kind"] == "product_lines":
        p = s["products"]
        x = {(l["from"], l["to"], q): rng.randint(0, 6) for l in s["lanes"] for q in p}
        day["volume"] = {n: sum(x[(l["from"], l["to"], q)] for q in p)
                         for n, l in zip(lanes, s["lanes"])}
        day["stock"] = {f"{d}/{q}": sum(v for (dd, _, qq), v in x.items() if (dd, qq) == (d, q))
                        for d in s["depots"] for q in p}
        day["demand"] = {f"{z}/{q}": sum(v for (_, zz, qq), v in x.items() if (zz, qq) == (z, q))
                         for z in s["zones"] for q in p}
        day["cost"] = {f"{rng.choice(lanes)}/{rng.choice(p)}": rng.randint(1, 12)
                       for _ in range(4)}
        return day
    trucks = s["kind"] == "truckloads"
    c = s.get("truck_capacity", 1)
    units = {}
    for n, l in zip(lanes, s["lanes"]):
        if trucks:
            t = rng.randint(0, l.get("capacity", 4))
            units[n] = rng.randint(c * (t - 1) + 1, c * t) if t else 0
        else:
            units[n] = rng.randint(0, l.get("capacity", 15))
    day["supply"] = {d: sum(u for n, u in units.items() if n.split("->")[0] == d)
                     + rng.randint(0, 4) for d in s["depots"]}
    day["demand"] = {z: sum(u for n, u in units.items() if n.split("->")[1] == z)
                     for z in s["zones"]}
    day["cost"] = {rng.choice(lanes): rng.randint(1, 9) for _ in range(3)}
    if trucks:
        day["truck_cost"] = {rng.choice(lanes): rng.randint(3, 16) for _ in range(2)}
    return day
