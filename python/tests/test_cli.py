"""The package answers as the command line does: the same files, the same variants, the same
status, plan, objective and steps."""

from __future__ import annotations

import json
import subprocess

import numpy as np
import pytest

import kernstep
from conftest import EXAMPLES, SCENARIOS, cli_binary, cli_json

MODEL_FILES = sorted(EXAMPLES.glob("*.json")) + sorted(EXAMPLES.glob("*.toml"))
FILES = MODEL_FILES + sorted(SCENARIOS.glob("*.toml"))


@pytest.fixture(scope="module")
def served(tmp_path_factory):
    """Each file's model and test set (built into one cache), by file name."""
    cache = tmp_path_factory.mktemp("cli-cache")
    sets = {}
    for path in FILES:
        model = kernstep.Model.from_file(path)
        sets[path.name] = (model, kernstep.TestSet.build(model, cache_dir=cache, progress=False),
                           cache)
    return sets


def same_answer(result: kernstep.Result, document: dict) -> None:
    """`result` says what the command line's solve document says."""
    assert result.outcome == document["status"]
    objective = document["objective"]
    assert result.objective == (None if objective is None else int(objective))
    # The document writes plan values as decimal strings (the JSON contract).
    x = document["x"]
    assert (None if result.x is None else result.x.tolist()) == (None if x is None else
                                                                  [int(v) for v in x])
    assert [result.steps_feasibility, result.steps_cost] == [document["steps"]["feasibility"],
                                                            document["steps"]["cost"]]


@pytest.mark.parametrize("path", FILES, ids=lambda p: p.name)
def test_solve_of_every_example_equals_the_command_line(path, served):
    model, testset, cache = served[path.name]
    result = testset.solve()
    # reference: `kernstep solve FILE --json` on the same file and cache
    same_answer(result, cli_json("solve", str(path), "--cache-dir", str(cache)))
    assert result.status == kernstep.Status.OPTIMAL


def variants(model: kernstep.Model, count: int, seed: int):
    """Variants with the right-hand side of a random point inside the model's box (or near
    zero where unbounded) and random costs: feasible by construction."""
    rng = np.random.default_rng(seed)
    n = model.shape[1]
    for _ in range(count):
        lo = np.array([0 if v is None else v for v in model.lower])
        hi = np.array([lo[j] + 6 if v is None else v for j, v in enumerate(model.upper)])
        x = rng.integers(lo, np.maximum(lo, hi) + 1)
        yield model.A @ x, rng.integers(0, 20, size=n)


# A scenario's days name their changes (demand of a zone, cost of a lane); the package takes
# numeric variants, so variants are compared on model files.
@pytest.mark.parametrize("path", MODEL_FILES, ids=lambda p: p.name)
def test_variants_equal_the_command_line(path, served):
    model, testset, cache = served[path.name]
    for k, (b, c) in enumerate(variants(model, 3, seed=len(path.name))):
        result = testset.solve(b=b, c=c)
        variant = json.dumps({"id": f"v{k}", "rhs": b.tolist(), "cost": c.tolist()})
        # reference: `kernstep solve FILE --variant JSON --json`
        same_answer(result, cli_json("solve", str(path), "--variant", variant,
                                     "--cache-dir", str(cache)))


@pytest.mark.parametrize("name", ["depot_stores.toml", "transport_3x3.json"])
def test_trace_equals_the_command_line(name, served):
    model, testset, cache = served[name]
    trace = testset.trace()
    # reference: `kernstep trace FILE --json`
    document = cli_json("trace", str(EXAMPLES / name), "--cache-dir", str(cache))
    assert list(trace) == document["steps"]
    assert trace.x.tolist() == [int(v) for v in document["x"]]
    assert trace.outcome == document["outcome"]
    start = trace.start
    for step in trace:
        start = start + int(step["length"]) * np.array(step["direction"])
    np.testing.assert_array_equal(start, trace.x)


# The words of `kernstep batch` records for the statuses these variants reach.
BATCH_WORDS = {"optimal": kernstep.Status.OPTIMAL, "infeasible": kernstep.Status.INFEASIBLE}


@pytest.mark.parametrize("path", MODEL_FILES, ids=lambda p: p.name)
def test_solve_many_equals_the_command_lines_batch(path, served, tmp_path):
    model, testset, cache = served[path.name]
    b, c = map(np.array, zip(*variants(model, 40, seed=3 * len(path.name))))
    b[::7, 0] += 1  # some variants the bounds or the lattice refuse
    days = tmp_path / "variants.jsonl"
    days.write_text("".join(json.dumps({"id": f"v{k}", "rhs": b[k].tolist(),
                                        "cost": c[k].tolist()}) + "\n" for k in range(len(b))))
    out = tmp_path / "out.jsonl"
    run = subprocess.run([str(cli_binary()), "batch", str(path), str(days), "--cache-dir",
                          str(cache), "--out", str(out)], capture_output=True, text=True)
    assert run.returncode in (0, 1), run.stderr
    records = [json.loads(line) for line in out.read_text().splitlines()]
    batch = testset.solve_many(B=b, C=c)
    # reference: `kernstep batch FILE VARIANTS` on the same variants and cache
    for k, record in enumerate(records):
        assert batch.status[k] == BATCH_WORDS[record["status"]], f"variant {k}"
        if record["plan"] is None:
            assert not batch.x[k].any()
            continue
        assert batch.objective[k] == int(record["objective"])
        plan = dict(zip(model.variable_names, batch.x[k].tolist()))
        assert {name: v for name, v in plan.items() if v} == {
            name: int(v) for name, v in record["plan"].items()}
        assert batch.steps[k] == record["steps"]
