#!/usr/bin/env python3
"""Reference MPS fixtures for kernstep's MPS reader.

Writes a few small integer models as MPS with PuLP (`LpProblem.writeMPS`), adds two
hand-written files that use RANGES and OBJNAME (PuLP does not write them), solves every file with HiGHS
through `highspy` (reading the very same MPS file) and stores the files plus the HiGHS status
and optimum in tests/fixtures/mps/reference.json.

Scenarios and names are invented. Models are kept to at most 12 variables after kernstep adds
its slack variables, so that the Graver basis in the Rust test is quick.

Run from the repository root:  python3 scripts/mps_reference.py
"""

import json
import pathlib

import highspy
import pulp

OUT = pathlib.Path(__file__).resolve().parent.parent / "tests" / "fixtures" / "mps"


def bakery_shifts():
    """Cover three periods with four shift types at least cost (G rows, upper bounds)."""
    p = pulp.LpProblem("bakery_shifts", pulp.LpMinimize)
    early = pulp.LpVariable("early", 0, 6, cat="Integer")
    day = pulp.LpVariable("day", 0, 6, cat="Integer")
    late = pulp.LpVariable("late", 0, 6, cat="Integer")
    split = pulp.LpVariable("split", 0, 3, cat="Integer")
    p += 5 * early + 4 * day + 6 * late + 7 * split
    p += early + split >= 3, "dawn"
    p += early + day >= 5, "noon"
    p += day + late + split >= 4, "dusk"
    return p


def orchard_crates():
    """Maximise crate value under picker hours with half-hour coefficients (row scaling)."""
    p = pulp.LpProblem("orchard_crates", pulp.LpMaximize)
    apple = pulp.LpVariable("apple", 0, None, cat="Integer")
    pear = pulp.LpVariable("pear", 0, 4, cat="Integer")
    plum = pulp.LpVariable("plum", 0, None, cat="Integer")
    p += 3 * apple + 5 * pear + 4 * plum
    p += 0.5 * apple + 1.5 * pear + plum <= 6.5, "pickers"
    p += apple + pear + plum <= 7, "trolleys"
    return p


def ferry_loading():
    """Binary lane choices, a free balance variable and costs in tenths (cost scaling)."""
    p = pulp.LpProblem("ferry_loading", pulp.LpMinimize)
    lanes = [pulp.LpVariable(f"lane_{k}", cat="Binary") for k in range(3)]
    trim = pulp.LpVariable("trim", None, None, cat="Integer")
    ballast = pulp.LpVariable("ballast", -2, 3, cat="Integer")
    p += 1.5 * lanes[0] + 0.7 * lanes[1] + 1.1 * lanes[2] + 0.2 * ballast + 0.1 * trim
    p += lanes[0] + lanes[1] + lanes[2] == 2, "lanes_used"
    p += 2 * lanes[0] + lanes[1] - lanes[2] - trim + ballast == 0, "balance"
    p += trim <= 1, "trim_cap"
    p += trim >= -1, "trim_floor"
    return p


def seed_mix():
    """Pack seed bags of 2 and 4 kilos into exactly 7 kilos: no integer point at all."""
    p = pulp.LpProblem("seed_mix", pulp.LpMinimize)
    small = pulp.LpVariable("small", 0, 10, cat="Integer")
    large = pulp.LpVariable("large", 0, 10, cat="Integer")
    p += small + large
    p += 2 * small + 4 * large == 7, "kilos"
    return p


KILN_SCHEDULE = """\
* Kiln firing plan: three batch types, two-sided rows written with RANGES (hand-written).
NAME kiln_schedule
OBJSENSE
    MAX
ROWS
 N  profit
 E  heat
 L  hours
 G  glaze
COLUMNS
    M1 'MARKER' 'INTORG'
    bowls profit 4 heat 2
    bowls hours 1 glaze 1
    tiles profit 3 heat 1
    tiles hours 2
    vases profit 6 heat 3
    vases hours 2 glaze 2
    M2 'MARKER' 'INTEND'
RHS
    rhs heat 6 hours 8
    rhs glaze 2
RANGES
    rng heat 4 hours 3
    rng glaze -2.5
BOUNDS
 UP bnd bowls 4
 UP bnd tiles 5
 UI bnd vases 3
ENDATA
"""


DYE_BATCHES = """\
* Dye batches: a negative range on an E row, a second free row to ignore (hand-written).
NAME dye_batches
OBJNAME
    spend
ROWS
 N  spend
 N  colour
 E  indigo
 L  vats
COLUMNS
    M1 'MARKER' 'INTORG'
    small colour 9 spend 2
    small indigo 1 vats 1
    large colour 1 spend 5
    large indigo 3 vats 2
    M2 'MARKER' 'INTEND'
RHS
    rhs indigo 11 vats 9
RANGES
    rng indigo -4
BOUNDS
 MI bnd small
 LO bnd large -1
 UP bnd small 6
 UP bnd large 4
ENDATA
"""


def solve(path):
    """The HiGHS status and objective for one MPS file, read by HiGHS itself."""
    h = highspy.Highs()
    h.setOptionValue("output_flag", False)
    h.setOptionValue("mip_rel_gap", 0.0)
    h.setOptionValue("mip_abs_gap", 0.0)
    if h.readModel(str(path)) != highspy.HighsStatus.kOk:
        raise RuntimeError(f"HiGHS could not read {path}")
    h.run()
    status = h.modelStatusToString(h.getModelStatus())
    entry = {"file": path.name, "status": status}
    if h.getModelStatus() == highspy.HighsModelStatus.kOptimal:
        entry["objective"] = round(h.getInfo().objective_function_value, 9) + 0.0
    return entry, h.version()


def main():
    OUT.mkdir(parents=True, exist_ok=True)
    for build in (bakery_shifts, orchard_crates, ferry_loading, seed_mix):
        problem = build()
        problem.writeMPS(str(OUT / f"{problem.name}.mps"), with_objsense=True)
    (OUT / "kiln_schedule.mps").write_text(KILN_SCHEDULE)
    (OUT / "dye_batches.mps").write_text(DYE_BATCHES)
    cases, version = [], None
    for path in sorted(OUT.glob("*.mps")):
        entry, version = solve(path)
        cases.append(entry)
    reference = {
        "source": f"HiGHS {version} via highspy, reading each MPS file; "
        f"files written by PuLP {pulp.__version__} (writeMPS) and by hand (kiln_schedule, dye_batches)",
        "cases": cases,
    }
    (OUT / "reference.json").write_text(json.dumps(reference, indent=2) + "\n")


if __name__ == "__main__":
    main()
