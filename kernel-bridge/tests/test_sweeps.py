"""Facts about `rhosigma.sweep` (issue 12): its rows are the lines `rhosigma sweep` writes, whether the points
run in this kernel's engine or on a real Dask cluster (dask and distributed from PyPI, a LocalCluster on
127.0.0.1 with two worker processes, each with its own long-lived engine), stopped by the test.

Sources: the command itself as the reference for rows (a separate `node bin/rhosigma.js sweep` process);
pandas 3.1 for the frame; the known facts of the sweep (data processing of the sandwiched Rényi divergence
fails at α = 0.05 < 1/2, Frank–Lieb 2013 and Beigi 2013 for the range where it holds) and the mean purity
2d/(d² + 1) of Hilbert–Schmidt states (Życzkowski–Sommers 2001).
"""
from __future__ import annotations

import json
import math
import subprocess
import tempfile
from pathlib import Path

import distributed  # dask.distributed from PyPI (requirements.txt); a missing package fails, never skips
import pandas as pd
import pytest

import rhosigma
from rhosigma.sweeps import sweep_rows

from conftest import BIN



def data_processing(alphas, samples, seed, **extra):
    div = lambda r, s: {"op": "divergence", "family": "alpha-z", "alpha": {"$": "alpha"}, "z": {"$": "alpha"}, "rho": {"$": r}, "sigma": {"$": s}}
    spec = {
        "sweep": 1, "seed": seed, "samples": samples,
        "parameters": {"alpha": {"values": alphas}},
        "draws": {
            "rho": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [2]},
            "sigma": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [2]},
            "N": {"op": "random-channel", "kind": "stinespring", "from": [2], "to": [2]},
        },
        "steps": {
            "Nrho": {"op": "apply-channel", "channel": {"$": "N"}, "rho": {"$": "rho"}},
            "Nsigma": {"op": "apply-channel", "channel": {"$": "N"}, "rho": {"$": "sigma"}},
        },
        "inequality": {"left": div("Nrho", "Nsigma"), "relation": "<=", "right": div("rho", "sigma")},
    }
    spec.update(extra)
    return spec


def command_rows(spec: dict) -> list[dict]:
    """The lines the command writes for `spec` (header and end line left out)."""
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "spec.json"
        out = Path(tmp) / "out.jsonl"
        path.write_text(json.dumps(spec))
        proc = subprocess.run(["node", str(BIN), "sweep", str(path), "-o", str(out), "--workers", "1"], capture_output=True, timeout=600)
        assert proc.returncode in (0, 1), proc.stderr.decode()
        lines = [json.loads(l) for l in out.read_text().splitlines()]
    return lines[1:-1]


def test_rows_equal_the_command_lines_and_make_a_frame():
    spec = data_processing([0.05, 0.7], 12, 7, record=["Nrho"])
    rows, facts = sweep_rows(spec, chunk=5)
    assert rows == command_rows(spec)
    df = rhosigma.sweep(spec, chunk=7)
    assert isinstance(df, pd.DataFrame)
    assert list(df["index"]) == list(range(24))
    assert list(df["alpha"]) == [0.05] * 12 + [0.7] * 12
    assert df.attrs["specHash"] == facts["specHash"] and df.attrs["seed"] == 7
    assert (df["gap"] == df["right"] - df["left"]).all()
    assert df.loc[df["alpha"] == 0.7, "violated"].eq(False).all()  # Frank–Lieb 2013, Beigi 2013
    assert df["recorded"].map(lambda r: "Nrho" in r).all()


def test_first_violation_and_failure_rows_match_the_command():
    spec = data_processing([0.05], 200, 2013, mode="first-violation")
    df = rhosigma.sweep(spec, chunk=16)
    assert df["violated"].iloc[-1] == True and not df["violated"].iloc[:-1].any()
    assert df["reproduce"].iloc[-1][0]["op"] == "random-state"
    assert sweep_rows(spec, chunk=16)[0] == command_rows(spec)
    bad = {"sweep": 1, "seed": 1, "samples": 2, "parameters": {"alpha": {"values": [0.3, 0.7]}},
           "draws": {"r": {"op": "random-state", "ensemble": "bures", "dims": [2]}},
           "quantity": {"op": "divergence", "family": "sandwiched", "alpha": {"$": "alpha"}, "rho": {"$": "r"}, "sigma": [[0.5, 0], [0, 0.5]]}}
    df = rhosigma.sweep(bad)
    assert list(df["error_code"].iloc[:2]) == ["invalid-argument", "invalid-argument"]
    assert df["error_code"].iloc[2:].isna().all()
    assert math.isfinite(df["value"].iloc[2])


def test_a_bad_spec_raises_naming_the_field():
    with pytest.raises(rhosigma.ComputeError) as e:
        rhosigma.sweep({"sweep": 1, "seed": 1, "parameters": {"alpha": {"from": 0, "to": 1}}, "quantity": {"op": "entropy", "rho": [[1]]}})
    assert e.value.path == "spec.parameters.alpha"


def test_hilbert_schmidt_purity_through_a_sweep():
    # Mean purity 2d/(d² + 1) of Hilbert–Schmidt states (Życzkowski–Sommers 2001): Tr ρ² = 2^(−H_2(ρ)).
    spec = {"sweep": 1, "seed": 5, "samples": 3000, "draws": {"r": {"op": "random-state", "ensemble": "hilbert-schmidt", "dims": [3]}},
            "quantity": {"op": "entropy", "alpha": 2, "rho": {"$": "r"}}}
    df = rhosigma.sweep(spec, chunk=1000)
    purity = 2.0 ** (-df["value"].astype(float))
    err = purity.std() / math.sqrt(len(purity))
    assert abs(purity.mean() - 2 * 3 / (9 + 1)) < 5 * err


def test_a_dask_local_cluster_gives_the_same_rows():
    spec = data_processing([0.05, 0.3], 10, 11, mode={"search": {"refine": 2, "evaluations": 40}})
    single, _ = sweep_rows(spec, chunk=4)
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, host="127.0.0.1",
                                       dashboard_address=None, protocol="tcp")
    try:
        with distributed.Client(cluster) as client:
            rows, facts = sweep_rows(spec, client=client, chunk=3)
            pids = client.run(lambda: __import__("rhosigma").default_engine().pid)
    finally:
        cluster.close()
    assert rows == single
    assert facts["mode"] == "search" and sum(1 for r in rows if "refined" in r) == 2
    # Each Dask worker ran its own long-lived engine process.
    assert len(set(pids.values())) == 2 and all(p is not None for p in pids.values())
