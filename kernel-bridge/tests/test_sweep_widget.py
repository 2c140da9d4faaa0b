"""Facts about the notebook sweep widget `rhosigma.widgets.Sweep` without a front end (issue 12, "In the notebook").

- Headless, `run()` gives exactly the rows `rhosigma.sweep(spec)` gives, and `frame()` the same DataFrame
  with the same attrs. This is a consistency check (the same engine through the same op), not an outside
  reference; the numbers are checked against numpy below.
- The values are Petz–Rényi divergences D_α(ρ‖σ) = log₂ Tr ρ^α σ^{1−α} / (α − 1) (Petz 1986; Tomamichel,
  "Quantum Information Processing with Finite Resources", 2016, Def. 4.3) of the recorded random states,
  recomputed with numpy's eigh (numpy 2).
- `observe` sees `done` move per chunk; a refused spec sets status "error" and `error` with the field at fault.
"""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import rhosigma
from rhosigma.errors import ComputeError
from rhosigma.sweeps import sweep_rows
from rhosigma.widgets import Sweep


def petz_spec(count: int = 6, seed: int = 11) -> dict:
    return {
        "sweep": 1, "seed": seed, "title": "Petz–Rényi divergence over α",
        "parameters": {"alpha": {"from": 0.2, "to": 1.8, "count": count}},
        "draws": {"rho": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [2]},
                  "sigma": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [2]}},
        "quantity": {"op": "divergence", "family": "petz", "alpha": {"$": "alpha"}, "rho": {"$": "rho"}, "sigma": {"$": "sigma"}},
        "record": ["rho", "sigma"],
    }


def matrix(state: dict) -> np.ndarray:
    m = state["matrix"]
    return np.array(m["re"]) + 1j * np.array(m.get("im", 0)) if isinstance(m, dict) else np.array(m, dtype=complex)


def power(a: np.ndarray, p: float) -> np.ndarray:
    w, v = np.linalg.eigh(a)
    return (v * np.clip(w, 0, None) ** p) @ v.conj().T


def test_headless_rows_and_frame_equal_rhosigma_sweep():
    spec = petz_spec()
    w = Sweep(spec)
    seen: list[int] = []
    w.observe(lambda ch: seen.append(ch["new"]), "done")
    rows = w.run(chunk=4)
    assert w.status == "done" and w.computed_by == "kernel" and w.done == w.total == 6
    assert seen == [4, 6], seen  # one change per chunk of four points (α = 1 is not on the grid)
    # Consistency check: the same rows as rhosigma.sweep's (the same engine, the same op), not an outside reference.
    expected, _ = sweep_rows(spec)
    assert rows == w.rows == expected
    pd.testing.assert_frame_equal(w.frame(), rhosigma.sweep(spec))
    assert w.frame().attrs == rhosigma.sweep(spec).attrs


def test_the_rows_values_are_petz_renyi_divergences_by_numpy():
    w = Sweep(petz_spec())
    w.run()
    for row in w.rows:
        a = row["parameters"]["alpha"]
        rho, sigma = matrix(row["recorded"]["rho"]), matrix(row["recorded"]["sigma"])
        expected = np.log2(np.trace(power(rho, a) @ power(sigma, 1 - a)).real) / (a - 1)  # Petz 1986
        assert row["value"] == pytest.approx(expected, rel=1e-10, abs=1e-12), a


def test_a_refused_spec_sets_status_error_naming_the_field():
    spec = petz_spec()
    spec["parameters"]["alpha"]["count"] = 0
    w = Sweep(spec)
    with pytest.raises(ComputeError) as e:
        w.run()
    assert w.status == "error"
    assert e.value.path == "spec.parameters.alpha" or str(e.value.path).startswith("spec.parameters.alpha"), e.value.path
    assert w.error["code"] == e.value.code


def test_nothing_runs_headless_before_run():
    w = Sweep(petz_spec())
    assert w.status == "idle" and w.rows == [] and w.done == 0


def test_front_end_chunks_are_appended_once_in_order_without_echo():
    # The front end's per-chunk message (src/widgets/sweep.ts): only the chunk's lines, at position `start`.
    # Python appends them (every row once, in order), tells observers per chunk, and sends nothing back:
    # the transfer stays linear in the rows (common practice for incremental updates over a channel).
    spec = petz_spec(count=5)
    expected, _ = sweep_rows(spec)
    w = Sweep(spec, auto=False)
    sent: list = []
    w.send_state = lambda key=None: sent.append(key)  # what ipywidgets would send to the front end
    seen: list = []
    w.observe(lambda c: seen.append(len(c["new"])), "rows")
    for start, stop in ((0, 1), (1, 3), (3, 5)):
        w._on_custom(w, {"event": "rows", "start": start, "rows": expected[start:stop]}, [])
    w._on_custom(w, {"event": "rows", "start": 2, "rows": expected[2:3]}, [])  # out of place: ignored
    assert w.rows == expected
    assert seen == [1, 3, 5]
    assert sent == []
    # A new run (Run again, or run() from Python) starts with an empty message at 0: the rows restart.
    w._on_custom(w, {"event": "rows", "start": 0, "rows": []}, [])
    w._on_custom(w, {"event": "rows", "start": 0, "rows": expected[:2]}, [])
    assert w.rows == expected[:2]
    assert sent == []
