#!/usr/bin/env python3
"""Writes tests/fixtures/demo/*.json: HiGHS optima for every day of the example scenarios.

Usage: python3 scripts/demo_reference.py [output directory]   (needs `pip install highspy`)

For each scenario in examples/scenarios/ with its JSON Lines days, this script builds the
integer program of every day from the schema documented in the README ("Transport scenarios",
"Daily variants"), written here a second time, independently of the Rust code, and solves
min cost.x, A x = rhs, lower <= x <= upper, x integer with HiGHS (through highspy). It records
per day the status (optimal or infeasible) and the optimal objective, and the total objective
over the optimal days, with the solver and its version. The scenarios are invented; the output
is deterministic.

A lane's surcharge (steps `{ above = N, per_unit = S }`: each unit beyond N costs S more) is a
convex piecewise-linear cost on the lane's units x, written the textbook way for a MILP
(Wolsey, "Integer Programming", 1998; Bertsimas and Tsitsiklis, "Introduction to Linear
Optimization", 1997, section 1.3): per step a nonnegative integer overflow variable
`lane/over{k}` with cost S and the row x - over + room = N (an integer slack `lane/room{k}`
>= 0), so over >= x - N and the minimisation holds it at max(0, x - N). No binary variables
are needed because the cost is convex. Days do not change surcharges.
"""

import json
import os
import sys
import tomllib

import highspy

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SCENARIOS = [
    ("vell_valley", "vell_valley.toml", "vell_valley_days.jsonl"),
    ("brackle_lanes", "brackle_lanes.toml", "brackle_lanes_days.jsonl"),
    ("hollin_trucks", "hollin_trucks.toml", "hollin_trucks_days.jsonl"),
    ("wendle_ferries", "wendle_ferries.toml", "wendle_ferries_days.jsonl"),
    ("corran_quarries", "corran_quarries.toml", "corran_quarries_days.jsonl"),
]


def tables(s):
    """The scenario's numbers as {field: {name: value}}, names as in the README."""
    lanes = [f"{l['from']}->{l['to']}" for l in s["lanes"]]
    t = {}
    if s["kind"] == "product_lines":
        p = s["products"]
        t["volume"] = {n: l["volume"] for n, l in zip(lanes, s["lanes"])}
        t["stock"] = {f"{d}/{q}": s["stock"][d][q] for d in s["depots"] for q in p}
        t["demand"] = {f"{z}/{q}": s["demand"][z][q] for z in s["zones"] for q in p}
        t["cost"] = {f"{n}/{q}": l["cost"][q] for n, l in zip(lanes, s["lanes"]) for q in p}
        return t
    t["supply"] = dict(s["supply"])
    t["demand"] = dict(s["demand"])
    t["cost"] = {n: l["cost"] for n, l in zip(lanes, s["lanes"])}
    t["capacity"] = {n: l.get("capacity") for n, l in zip(lanes, s["lanes"])}
    t["keep_cost"] = {d: s.get("keep_cost", {}).get(d, 0) for d in s["depots"]}
    if s["kind"] == "truckloads":
        t["truck_cost"] = {n: l["truck_cost"] for n, l in zip(lanes, s["lanes"])}
    return t


def program(s, t):
    """Columns as {name: (cost, lower, upper)} and rows as (coefficients by name, rhs)."""
    ends = [(l["from"], l["to"], f"{l['from']}->{l['to']}") for l in s["lanes"]]
    cols, rows = {}, []
    if s["kind"] == "product_lines":
        p = s["products"]
        for d, z, n in ends:
            for q in p:
                cols[f"{n}/{q}"] = (t["cost"][f"{n}/{q}"], 0, None)
        for d, z, n in ends:
            rows.append(({f"{n}/{q}": 1 for q in p}, t["volume"][n]))
        for d in s["depots"]:
            for q in p:
                rows.append(({f"{n}/{q}": 1 for dd, z, n in ends if dd == d}, t["stock"][f"{d}/{q}"]))
        for z in s["zones"]:
            for q in p:
                rows.append(({f"{n}/{q}": 1 for d, zz, n in ends if zz == z}, t["demand"][f"{z}/{q}"]))
        return cols, rows
    trucks = s["kind"] == "truckloads"
    c = s.get("truck_capacity")
    for d, z, n in ends:
        cols[n] = (t["cost"][n], 0, None if trucks else t["capacity"][n])
        if trucks:
            cols[f"{n}/spare"] = (0, 0, c - 1)
            cols[f"{n}/trucks"] = (t["truck_cost"][n], 0, t["capacity"][n])
            rows.append(({n: 1, f"{n}/spare": 1, f"{n}/trucks": -c}, 0))
    for d, z, n in ends:
        lane = next(l for l in s["lanes"] if (l["from"], l["to"]) == (d, z))
        for k, step in enumerate(lane.get("surcharge", [])):
            cols[f"{n}/over{k}"] = (step["per_unit"], 0, None)
            cols[f"{n}/room{k}"] = (0, 0, None)
            rows.append(({n: 1, f"{n}/over{k}": -1, f"{n}/room{k}": 1}, step["above"]))
    for d in s["depots"]:
        cols[f"{d}/kept"] = (t["keep_cost"][d], 0, None)
        coeffs = {n: 1 for dd, z, n in ends if dd == d}
        coeffs[f"{d}/kept"] = 1
        rows.append((coeffs, t["supply"][d]))
    for z in s["zones"]:
        rows.append(({n: 1 for d, zz, n in ends if zz == z}, t["demand"][z]))
    return cols, rows


def highs_program(cols, rows):
    """A HiGHS instance holding the integer program; returns it and the column names."""
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.setOptionValue("mip_rel_gap", 0.0)
    h.setOptionValue("mip_abs_gap", 0.0)
    names = list(cols)
    index = {n: i for i, n in enumerate(names)}
    inf = highspy.kHighsInf
    for n in names:
        cost, lo, up = cols[n]
        h.addVar(lo, inf if up is None else up)
        h.changeColCost(index[n], cost)
        h.changeColIntegrality(index[n], highspy.HighsVarType.kInteger)
    for coeffs, rhs in rows:
        idx = [index[n] for n in coeffs]
        h.addRow(rhs, rhs, len(idx), idx, [float(coeffs[n]) for n in coeffs])
    return h, names


def solve(cols, rows):
    """HiGHS on the integer program; returns ("optimal", objective) or ("infeasible", None)."""
    h, _ = highs_program(cols, rows)
    h.run()
    status = h.getModelStatus()
    if status == highspy.HighsModelStatus.kOptimal:
        return "optimal", round(h.getInfo().objective_function_value)
    if status == highspy.HighsModelStatus.kInfeasible:
        return "infeasible", None
    raise RuntimeError(f"unexpected HiGHS status {h.modelStatusToString(status)}")


def day_tables(base, change):
    t = {f: dict(v) for f, v in base.items()}
    for field, values in change.items():
        if field != "day":
            t[field].update(values)
    return t


def generator(s):
    """The script, and for a scenario with surcharges how they were modelled."""
    out = {"script": "scripts/demo_reference.py"}
    if any(l.get("surcharge") for l in s["lanes"]):
        out["surcharges"] = ("one integer overflow variable over >= units - above per step, "
                             "cost per_unit (Wolsey 1998; Bertsimas and Tsitsiklis 1997, "
                             "section 1.3)")
    return out


def reference(name, scenario_file, days_file):
    with open(os.path.join(ROOT, "examples", "scenarios", scenario_file), "rb") as f:
        s = tomllib.load(f)
    base = tables(s)
    days = []
    with open(os.path.join(ROOT, "examples", "scenarios", days_file)) as f:
        for line in f:
            if line.strip():
                change = json.loads(line)
                status, objective = solve(*program(s, day_tables(base, change)))
                days.append({"day": change["day"], "status": status, "objective": objective})
    return {
        "fixture": "kernstep scenario days reference",
        "name": name,
        "scenario": f"examples/scenarios/{scenario_file}",
        "days_file": f"examples/scenarios/{days_file}",
        "reference": {"solver": "HiGHS", "version": highspy.Highs().version(), "interface": "highspy"},
        "generator": generator(s),
        "days": days,
        "total_objective": sum(d["objective"] for d in days if d["objective"] is not None),
    }


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(ROOT, "tests", "fixtures", "demo")
    os.makedirs(out, exist_ok=True)
    for name, scenario_file, days_file in SCENARIOS:
        doc = reference(name, scenario_file, days_file)
        with open(os.path.join(out, f"{name}.json"), "w") as f:
            json.dump(doc, f, indent=1)
            f.write("\n")
        optimal = sum(d["status"] == "optimal" for d in doc["days"])
        print(f"{name}: {len(doc['days'])} days, {optimal} optimal, total {doc['total_objective']}")


if __name__ == "__main__":
    main()
