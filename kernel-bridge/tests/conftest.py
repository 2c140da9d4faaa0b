"""Shared helpers of the rhosigma package's tests: the real engine, run through its own command too.

No mocks: every test talks to a real `rhosigma serve` (or `rhosigma compute`) process built from this
checkout. numpy is the outside reference for numbers (numpy.linalg.eigvalsh, LAPACK).
"""
from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[2]
BIN = ROOT / "bin" / "rhosigma.js"
PYTHON = sys.executable

if not (ROOT / "dist" / "cli" / "main.js").is_file():  # pragma: no cover - setup.sh builds it
    raise RuntimeError("the engine is not built: run `bash scripts/setup.sh` (or `npm run build`) first")


def cli_compute(requests: list, *, args: tuple[str, ...] = ()) -> list:
    """Answers from the `rhosigma compute` command itself (one process, a JSON array in and out)."""
    proc = subprocess.run(
        ["node", str(BIN), "compute", "-", *args],
        input=json.dumps(requests).encode("utf-8"),
        capture_output=True,
        check=False,
        timeout=300,
    )
    assert proc.returncode in (0, 1), proc.stderr.decode("utf-8", "replace")
    return json.loads(proc.stdout.decode("utf-8"))


def random_density(d: int, rng: np.random.Generator, rank: int | None = None) -> np.ndarray:
    """A random density matrix G G* / Tr G G* (Ginibre; common practice)."""
    g = rng.normal(size=(d, rank or d)) + 1j * rng.normal(size=(d, rank or d))
    p = g @ g.conj().T
    return p / np.trace(p).real


def random_hermitian(d: int, rng: np.random.Generator) -> np.ndarray:
    g = rng.normal(size=(d, d)) + 1j * rng.normal(size=(d, d))
    return (g + g.conj().T) / 2


def numpy_entropy(rho: np.ndarray) -> float:
    """−Σ λ log2 λ over the eigenvalues from numpy.linalg.eigvalsh (LAPACK)."""
    lam = np.linalg.eigvalsh(rho)
    lam = lam[lam > 1e-15]
    return float(-(lam * np.log2(lam)).sum())


def process_group_alive(pgid: int) -> bool:
    try:
        os.killpg(pgid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # pragma: no cover
        return True
    return True


def group_members(pgid: int) -> list[int]:
    """Process ids whose process group is `pgid` (from /proc, Linux)."""
    out = []
    for entry in os.listdir("/proc"):
        if not entry.isdigit():
            continue
        try:
            with open(f"/proc/{entry}/stat", "rb") as f:
                fields = f.read().rsplit(b")", 1)[1].split()
        except OSError:
            continue
        # After the command name: state, ppid, pgrp, ...; zombies (state Z) are already dead.
        if int(fields[2]) == pgid and fields[0] != b"Z":
            out.append(int(entry))
    return out


@pytest.fixture
def engine():
    """A private engine for tests that kill or time out its process (the kernel's default is left alone)."""
    from rhosigma import Engine

    e = Engine()
    yield e
    e.close()


def cpu_seconds(pid: int) -> float:
    """User + system CPU time of a process so far (/proc/PID/stat, Linux)."""
    with open(f"/proc/{pid}/stat", "rb") as f:
        fields = f.read().rsplit(b")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")


def wait_until_idle(pid: int, quiet: float = 0.3, limit: float = 30.0) -> None:
    """Return once `pid` has spent no CPU for `quiet` seconds: `rhosigma serve` warms its solver while idle
    after start-up, and a test that watches CPU to find the moment a request is in flight must not see
    that warm-up instead."""
    import time

    deadline = time.monotonic() + limit
    last, since = cpu_seconds(pid), time.monotonic()
    while time.monotonic() < deadline:
        time.sleep(0.05)
        now = cpu_seconds(pid)
        if now != last:
            last, since = now, time.monotonic()
        elif time.monotonic() - since >= quiet:
            return


def kill_when_busy(pid: int, cpu: float = 0.3, limit: float = 60.0, action=None) -> "threading.Thread":
    """A started thread that SIGKILLs `pid` (or calls `action()`) once it has spent `cpu` more seconds of
    CPU (it is computing), which on a loaded machine is a surer sign than wall time that a request is
    in flight."""
    import signal
    import threading
    import time

    def run() -> None:
        start = cpu_seconds(pid)
        deadline = time.monotonic() + limit
        while time.monotonic() < deadline:
            try:
                if cpu_seconds(pid) - start >= cpu:
                    if action is None:
                        os.kill(pid, signal.SIGKILL)
                    else:
                        action()
                    return
            except (OSError, ValueError):
                return
            time.sleep(0.01)

    t = threading.Thread(target=run, daemon=True)
    t.start()
    return t


def slow_request(**extra) -> dict:
    """A request that is small to send and takes seconds to compute: the diamond distance of two
    6-dimensional channels (an SDP; built from the engine's own presets)."""
    from rhosigma import channel_preset

    a = channel_preset("depolarizing", d=6, p=0.3).to_protocol()
    b = channel_preset("dephasing", d=6, p=0.4).to_protocol()
    return {"op": "diamond-distance", "a": a, "b": b, **extra}
