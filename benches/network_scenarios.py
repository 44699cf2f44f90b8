#!/usr/bin/env python3
"""Network plans at any size: `kernstep batch` on generated lane networks against HiGHS.

The script generates, with a fixed seed, one `kind = "lanes"` scenario file per size (DEPOTS x
ZONES: 10 x 50, 20 x 100 and 50 x 500 by default). Each zone is served by 3 to 5 distinct random
depots; most lanes carry a capacity; depot supplies exceed the total demand, so the `kept`
variables absorb the surplus at a keep cost. The day-0 numbers come from a random plan, so the
scenario itself is feasible. Each scenario gets a day file (JSON Lines, the README's "Daily
variants" schema) of DAYS days, each changing a few demands (up or down by at most 30%), some
lane costs and, on about one day in four, one lane capacity (sometimes lifted). About one day in
a hundred has a demand surge in one zone (three times its demand), which can make the day
infeasible; infeasible days are counted, and both peers must agree on them. Names are invented
(depots `d01`, ..., zones `z001`, ...).

Then, per size, in one run:
  - HiGHS (highspy), best re-optimisation mode, as in benches/replan_scenarios.py: the first
    day's program passed once, then per day only the column costs, column bounds and row
    bounds changed, one thread, timed on solving only (every day's program is compiled from the
    scenario file by scripts/demo_reference.py, an independent Python reading of the schema,
    before the clock starts). Each day's status (optimal or infeasible) and optimum is kept;
  - `kernstep build SCENARIO --cache-dir C` once, timed (the overnight step, into an empty
    cache);
  - `kernstep batch SCENARIO DAYS --cache-dir C --out OUT` as a whole process (reading both
    files, loading the set, solving, writing every plan) with `--threads 1`, `--threads 2` and
    `--chain --threads 1`.
Every timing is the best of REPEATS runs (HiGHS over all days, each kernstep batch process).
The script prints one table per size: milliseconds per day, the throughput ratio against HiGHS
kept, how many days have the same answer as HiGHS ("equal": optimal with the same objective,
or both infeasible), and the days kernstep reports as `optimal_within_norm` or `error` (both
are failures here: the benchmark asks for certified optima); then the build time. A kernstep
process that runs longer than --timeout seconds is stopped and its row says "did not finish in
T s"; a process that fails says so with its first line on stderr. The build is given
`--time-limit` at 80% of the timeout so that it can stop with its own status, and any process
still running at the timeout is killed (SIGKILL), so the script never waits longer than the
timeout for a kernstep process. When the build stores no set, the batch rows say "not run".

Usage: python3 benches/network_scenarios.py [DAYS] [REPEATS] [--sizes 10x50,20x100,50x500]
           [--timeout SECONDS] [--keep DIR] [--max-elements N] [--skip-kernstep]
       (defaults 1000 days, 3 repeats, all three sizes, 600 s; any DxZ size is accepted, e.g.
       `--sizes 3x8` for a network small enough for an enumerated test set. --keep DIR writes
       the scenario, day and result files to DIR (files are rebuilt identically from the seed)
       instead of a temporary directory; the cache is always a fresh temporary directory, so
       the build is timed from scratch. --max-elements N is passed to `kernstep build` (whose
       own default is what fits in memory) so that a build that cannot finish does not take a
       shared machine's memory; --skip-kernstep runs the HiGHS side only.)
Needs `pip install highspy` (and numpy, which highspy installs) and the release binary
target/release/kernstep (built with `cargo build --release` when it is missing).
"""

import argparse
import json
import os
import random
import subprocess
import sys
import tempfile
import time
import tomllib

import highspy
import numpy as np

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(ROOT, "scripts"))
import demo_reference as ref  # noqa: E402

BINARY = os.path.join(ROOT, "target", "release", "kernstep")
SEED = 20261214
DEFAULT_SIZES = "10x50,20x100,50x500"
INF = highspy.kHighsInf


# ----------------------------------------------------------------------------- generation


def lane_name(lane):
    return f"{lane['from']}->{lane['to']}"


def make_scenario(n_depots, n_zones, rng):
    """A feasible lanes scenario: a random plan first, then limits and supplies around it."""
    depots = [f"d{i:02d}" for i in range(1, n_depots + 1)]
    zones = [f"z{j:03d}" for j in range(1, n_zones + 1)]
    demand, lanes = {}, []
    shipped = {d: 0 for d in depots}
    for z in zones:
        served_by = sorted(rng.sample(depots, min(n_depots, rng.randint(3, 5))))
        demand[z] = rng.randint(5, 40)
        cuts = sorted(rng.randint(0, demand[z]) for _ in served_by[1:])
        parts = [b - a for a, b in zip([0] + cuts, cuts + [demand[z]])]
        for d, units in zip(served_by, parts):
            lane = {"from": d, "to": z, "cost": rng.randint(1, 30)}
            if rng.random() < 0.8:
                lane["capacity"] = units + rng.randint(2, 15)
            lanes.append(lane)
            shipped[d] += units
    supply = {d: shipped[d] + round(0.15 * shipped[d]) + rng.randint(3, 10) for d in depots}
    keep_cost = {d: rng.randint(0, 3) for d in depots}
    return {
        "kind": "lanes",
        "title": f"Invented lane network, {n_depots} depots x {n_zones} zones",
        "depots": depots,
        "zones": zones,
        "supply": supply,
        "demand": demand,
        "keep_cost": keep_cost,
        "lanes": lanes,
    }


def to_toml(s):
    """The scenario as TOML (every name is a bare key: letters and digits only)."""
    def names(xs):
        return "[" + ", ".join(f'"{x}"' for x in xs) + "]"

    out = ["# Invented lane network generated by benches/network_scenarios.py (fixed seed).",
           f'kind = "{s["kind"]}"', f'title = "{s["title"]}"',
           f"depots = {names(s['depots'])}", f"zones = {names(s['zones'])}", ""]
    for table in ("supply", "demand", "keep_cost"):
        out.append(f"[{table}]")
        out += [f"{k} = {v}" for k, v in s[table].items()]
        out.append("")
    for lane in s["lanes"]:
        out += ["[[lanes]]", f'from = "{lane["from"]}"', f'to = "{lane["to"]}"',
                f"cost = {lane['cost']}"]
        if "capacity" in lane:
            out.append(f"capacity = {lane['capacity']}")
        out.append("")
    return "\n".join(out)


def draw_day(s, rng, label):
    """One day of changes by name, relative to the scenario file (README "Daily variants")."""
    zones = s["zones"]
    lanes = [lane_name(l) for l in s["lanes"]]
    capped = [(lane_name(l), l["capacity"]) for l in s["lanes"] if "capacity" in l]
    day = {"day": label}
    picked = rng.sample(zones, min(len(zones), rng.randint(2, 6)))
    day["demand"] = {z: round(s["demand"][z] * rng.uniform(0.7, 1.3)) for z in picked}
    if rng.random() < 0.01:
        z = rng.choice(zones)
        day["demand"][z] = 3 * s["demand"][z]
    day["cost"] = {n: rng.randint(1, 30)
                   for n in rng.sample(lanes, min(len(lanes), rng.randint(3, 10)))}
    if capped and rng.random() < 0.25:
        n, cap = rng.choice(capped)
        day["capacity"] = {n: None if rng.random() < 0.2 else rng.randint(0, 2 * cap)}
    return day


def write_size(n_depots, n_zones, count, directory):
    """Writes the scenario and day files of one size; returns their paths and the day list."""
    rng = random.Random(f"{SEED}-{n_depots}x{n_zones}")
    s = make_scenario(n_depots, n_zones, rng)
    days = [draw_day(s, rng, f"day{k:04d}") for k in range(1, count + 1)]
    stem = f"network_{n_depots}x{n_zones}"
    scenario_path = os.path.join(directory, f"{stem}.toml")
    days_path = os.path.join(directory, f"{stem}_days.jsonl")
    with open(scenario_path, "w") as f:
        f.write(to_toml(s))
    with open(days_path, "w") as f:
        f.writelines(json.dumps(d) + "\n" for d in days)
    return scenario_path, days_path, days


# ----------------------------------------------------------------------------- HiGHS


def compiled_numbers(s, days):
    """The first day's program and, per day, its numbers as arrays in one column/row order.

    Every day is compiled in full by demo_reference.program; only its numbers are kept (the
    matrix is checked to be the first day's, as the README promises)."""
    base = ref.tables(s)
    first = ref.program(s, ref.day_tables(base, days[0]))
    names = list(first[0])
    matrix = [coeffs for coeffs, _ in first[1]]
    numbers = []
    for change in days:
        cols, rows = ref.program(s, ref.day_tables(base, change))
        if list(cols) != names or [coeffs for coeffs, _ in rows] != matrix:
            raise SystemExit(f"day {change['day']}: the program's matrix changed")
        numbers.append((np.array([cols[n][0] for n in names], dtype=float),
                        np.array([cols[n][1] for n in names], dtype=float),
                        np.array([INF if cols[n][2] is None else cols[n][2] for n in names],
                                 dtype=float),
                        np.array([rhs for _, rhs in rows], dtype=float)))
    return first, numbers


def highs_kept(first, numbers):
    """HiGHS with the model kept alive; returns ([(status, objective)] per day, seconds)."""
    h, names = ref.highs_program(*first)
    h.setOptionValue("threads", 1)
    cols = np.arange(len(names), dtype=np.int32)
    rows = np.arange(len(first[1]), dtype=np.int32)
    answers = []
    start = time.perf_counter()
    for cost, lower, upper, rhs in numbers:
        h.changeColsCost(len(cols), cols, cost)
        h.changeColsBounds(len(cols), cols, lower, upper)
        h.changeRowsBounds(len(rows), rows, rhs, rhs)
        h.run()
        status = h.getModelStatus()
        if status == highspy.HighsModelStatus.kOptimal:
            answers.append(("optimal", round(h.getInfo().objective_function_value)))
        elif status == highspy.HighsModelStatus.kInfeasible:
            answers.append(("infeasible", None))
        else:
            answers.append((h.modelStatusToString(status), None))
    return answers, time.perf_counter() - start


# ----------------------------------------------------------------------------- kernstep


def kernstep(args, timeout):
    """Runs the binary; returns (CompletedProcess or None on timeout, wall seconds)."""
    start = time.perf_counter()
    try:
        run = subprocess.run([BINARY, *args], capture_output=True, text=True, timeout=timeout)
    except subprocess.TimeoutExpired:
        return None, time.perf_counter() - start
    return run, time.perf_counter() - start


def first_error(run):
    lines = [l for l in run.stderr.splitlines() if l.strip()]
    text = next((l for l in lines if l.startswith("kernstep: ")), lines[0] if lines else "")
    return f"failed (exit {run.returncode}): {text[:160]}" if text else \
        f"failed (exit {run.returncode})"


def build(scenario, cache, timeout, max_elements):
    """`kernstep build` into an empty cache: (seconds, elements or None, failure or None)."""
    # --time-limit (with room for the build to notice it and stop) lets a build that runs too
    # long end with its own status; the subprocess timeout is the backstop.
    limit = max(1, int(timeout * 0.8))
    extra = ["--max-elements", str(max_elements)] if max_elements else []
    run, wall = kernstep(["build", scenario, "--cache-dir", cache, "--json",
                          "--time-limit", str(limit), *extra], timeout)
    if run is None:
        return wall, None, f"did not finish in {timeout:g} s"
    try:
        row = json.loads(run.stdout)["models"][0]
    except (ValueError, IndexError, KeyError, TypeError):
        row = {}
    status = row.get("status") or ""
    if run.returncode != 0 or not status.startswith(("built", "present")):
        if "TimeLimit" in status:
            return wall, None, (f"did not finish in {timeout:g} s (stopped itself at its "
                                f"--time-limit {limit} s)")
        return wall, None, (f"{status} (exit {run.returncode})" if status else first_error(run))
    return wall, row.get("elements"), None


def read_results(path):
    try:
        with open(path) as f:
            # Day records write objectives as decimal strings (the JSON contract).
            return [objective_as_int(json.loads(line)) for line in f if line.strip()]
    except (OSError, ValueError):
        return None


def batch_best(scenario, days_path, cache, extra, repeats, timeout, out, count):
    """Best of `repeats` whole `kernstep batch` processes.

    Returns (seconds, records, note, failure): records of the fastest run; a failure string
    instead when a run did not finish, failed or wrote fewer than `count` days (no repeat is
    tried after a failure, so a size that does not finish costs one timeout per row)."""
    best, records, varied = None, None, False
    for _ in range(repeats):
        if os.path.exists(out):
            os.remove(out)
        run, wall = kernstep(["batch", scenario, days_path, *extra, "--cache-dir", cache,
                              "--out", out], timeout)
        if run is None:
            return None, None, None, f"did not finish in {timeout:g} s"
        got = read_results(out)
        if run.returncode not in (0, 1, 2):  # killed or crashed
            return None, None, None, first_error(run)
        if got is None:
            return None, None, None, first_error(run) if run.returncode else "no results written"
        if len(got) != count:
            return None, None, None, f"wrote {len(got)} of {count} days; {first_error(run)}"
        if run.returncode == 2 and not any(r.get("status") == "error" for r in got):
            return None, None, None, first_error(run)  # exit 2 without a bad day: an error
        if records is not None and answers_of(got) != answers_of(records):
            varied = True
        if best is None or wall < best:
            best, records = wall, got
    return best, records, "answers varied between runs" if varied else None, None


def objective_as_int(record):
    """`record` with its objective (a decimal string, or null) as an integer."""
    if record.get("objective") is not None:
        record["objective"] = int(record["objective"])
    return record


def answers_of(records):
    return [(r.get("status"), r.get("objective")) for r in records]


def compare(records, highs, labels):
    """Counts of days equal to HiGHS, of optimal_within_norm and error days, and the others."""
    by_day = {r.get("day"): r for r in records}
    equal = within = errors = wrong = 0
    others = {}
    for label, (h_status, h_objective) in zip(labels, highs):
        r = by_day.get(label)
        status = r.get("status") if r else "missing"
        objective = r.get("objective") if r else None
        if status == "optimal" and h_status == "optimal":
            if objective is not None and round(objective) == h_objective:
                equal += 1
            else:
                wrong += 1
        elif status == "infeasible" and h_status == "infeasible":
            equal += 1
        elif status == "optimal_within_norm":
            within += 1
        elif status == "error":
            errors += 1
        else:
            key = f"{status} (HiGHS {h_status})"
            others[key] = others.get(key, 0) + 1
    notes = []
    if wrong:
        notes.append(f"{wrong} optimal with another objective")
    notes += [f"{n} {key}" for key, n in sorted(others.items())]
    return equal, within, errors, notes


# ----------------------------------------------------------------------------- report


def parse_sizes(text):
    sizes = []
    for part in text.split(","):
        try:
            d, z = (int(x) for x in part.strip().lower().split("x"))
        except ValueError:
            raise SystemExit(f"--sizes: {part!r} is not DEPOTSxZONES (e.g. 10x50)")
        if d < 1 or z < 1:
            raise SystemExit(f"--sizes: {part!r} needs at least one depot and one zone")
        sizes.append((d, z))
    return sizes


ROW = "{:<38}{:>11}{:>15}{:>13}{:>13}{:>7}   {}"


def run_size(n_depots, n_zones, args, directory, cache_root):
    count, repeats, timeout = args.days, args.repeats, args.timeout
    t0 = time.perf_counter()
    scenario, days_path, days = write_size(n_depots, n_zones, count, directory)
    with open(scenario, "rb") as f:
        s = tomllib.load(f)
    labels = [d["day"] for d in days]
    first, numbers = compiled_numbers(s, days)
    setup = time.perf_counter() - t0
    best, highs_varied = None, False
    for _ in range(repeats):
        answers, seconds = highs_kept(first, numbers)
        highs_varied |= best is not None and answers != best[0]
        if best is None or seconds < best[1]:
            best = (answers, seconds)
    highs, highs_s = best
    optimal = sum(a == "optimal" for a, _ in highs)
    infeasible = sum(a == "infeasible" for a, _ in highs)
    other = count - optimal - infeasible
    capped = sum("capacity" in l for l in s["lanes"])
    size = f"{n_depots}x{n_zones}"
    print()
    print(f"== {size}: {n_depots} depots, {n_zones} zones, {len(s['lanes'])} lanes ({capped} "
          f"with a capacity); {len(first[0])} variables, {len(first[1])} rows; {count} days "
          f"(HiGHS: {optimal} optimal, {infeasible} infeasible"
          f"{f', {other} other' if other else ''}); files and programs {setup:.1f} s")
    print(f"   {scenario}\n   {days_path}")
    print(ROW.format("peer", "ms/day", "vs HiGHS kept", "equal", "within_norm", "error",
                     "note"))
    base = highs_s / count * 1000
    print(ROW.format("HiGHS, model kept, 1 thread", f"{base:.4f}", "1.0x", "reference",
                     "-", "-", "answers varied between runs" if highs_varied else ""))
    sys.stdout.flush()
    if args.skip_kernstep:
        return
    cache = os.path.join(cache_root, size)
    build_s, elements, build_failure = build(scenario, cache, timeout, args.max_elements)
    peers = [("kernstep batch, 1 thread", ["--threads", "1"], "t1"),
             ("kernstep batch, 2 threads", ["--threads", "2"], "t2"),
             ("kernstep batch --chain, 1 thread", ["--chain", "--threads", "1"], "chain")]
    for label, extra, tag in peers:
        if build_failure:
            print(ROW.format(label, "-", "-", "-", "-", "-", "not run: no test set stored"))
            continue
        out = os.path.join(directory, f"network_{size}_plans_{tag}.jsonl")
        seconds, records, note, failure = batch_best(scenario, days_path, cache, extra,
                                                     repeats, timeout, out, count)
        if failure:
            print(ROW.format(label, "-", "-", "-", "-", "-", failure))
        else:
            equal, within, errors, notes = compare(records, highs, labels)
            if note:
                notes.append(note)
            ms = seconds / count * 1000
            print(ROW.format(label, f"{ms:.4f}", f"{base / ms:.1f}x", f"{equal}/{count}",
                             str(within), str(errors), "; ".join(notes)))
        sys.stdout.flush()
    if build_failure:
        print(f"kernstep build (once, empty cache): {build_failure} ({build_s:.1f} s)")
    else:
        moves = f", {elements} moves" if elements is not None else ""
        print(f"kernstep build (once, empty cache): {build_s:.3f} s{moves}")


def main():
    p = argparse.ArgumentParser(description="kernstep batch vs HiGHS kept on generated lane "
                                "networks (see the module docstring)")
    p.add_argument("days", nargs="?", type=int, default=1000, help="days per size (1000)")
    p.add_argument("repeats", nargs="?", type=int, default=3, help="best of N runs (3)")
    p.add_argument("--sizes", default=DEFAULT_SIZES, help=f"DxZ list ({DEFAULT_SIZES})")
    p.add_argument("--timeout", type=float, default=600.0,
                   help="seconds per kernstep process (600)")
    p.add_argument("--keep", metavar="DIR", help="write scenario, day and result files here")
    p.add_argument("--max-elements", type=int, metavar="N",
                   help="passed to `kernstep build` (default: kernstep's own, what fits in "
                   "memory), to keep a build that cannot finish from taking a shared machine's "
                   "memory")
    p.add_argument("--skip-kernstep", action="store_true", help="run the HiGHS side only")
    args = p.parse_args()
    if args.days < 1 or args.repeats < 1 or args.timeout <= 0:
        raise SystemExit("DAYS and REPEATS must be at least 1, --timeout above 0")
    sizes = parse_sizes(args.sizes)
    if not args.skip_kernstep and not os.path.exists(BINARY):
        print("target/release/kernstep is missing: cargo build --release", flush=True)
        subprocess.run(["cargo", "build", "--release"], cwd=ROOT, check=True)
    version = "" if args.skip_kernstep else subprocess.run(
        [BINARY, "--version"], capture_output=True, text=True).stdout.strip()
    print(f"HiGHS {highspy.Highs().version()} (highspy), one thread, model kept"
          f"{'; ' + version + ' (' + BINARY + ')' if version else ''}")
    print(f"{args.days} days per size, best of {args.repeats} runs, kernstep processes "
          f"stopped after {args.timeout:g} s; seed {SEED}")
    with tempfile.TemporaryDirectory(prefix="kernstep-network-") as tmp:
        directory = args.keep or os.path.join(tmp, "files")
        os.makedirs(directory, exist_ok=True)
        for n_depots, n_zones in sizes:
            run_size(n_depots, n_zones, args, directory, os.path.join(tmp, "cache"))


if __name__ == "__main__":
    main()
