"""Python side of rhosigma: send plain-data requests to the engine and get plain data back.

The engine is the `rhosigma compute` command (Node); this module only converts between Python values and the
protocol's JSON (numpy arrays become {"re", "im"} rows, "Infinity" becomes float('inf')) and runs the command.
It computes nothing itself.

    >>> from rhosigma_bridge import compute
    >>> compute({"op": "entropy", "rho": [[0.5, 0], [0, 0.5]]})["value"]
    1.0
"""
from __future__ import annotations

import json
import math
import os
import shutil
import subprocess
from pathlib import Path
from typing import Any, Iterable

__all__ = ["compute", "value", "ComputeError", "to_protocol", "from_protocol", "engine_command"]


class ComputeError(Exception):
    """A request the engine answered with {"ok": false}: carries its code, message and path."""

    def __init__(self, answer: dict):
        err = answer.get("error", {})
        self.code = err.get("code", "unknown")
        self.path = err.get("path")
        self.answer = answer
        where = f" (at {self.path})" if self.path else ""
        super().__init__(f"{answer.get('op', '?')}: {self.code}: {err.get('message', '')}{where}")


def engine_command() -> list[str]:
    """The command that runs the engine: $RHOSIGMA_COMMAND, else the checkout's bin, else `rhosigma` on PATH."""
    env = os.environ.get("RHOSIGMA_COMMAND")
    if env:
        return env.split()
    here = Path(__file__).resolve().parent.parent.parent / "bin" / "rhosigma.js"
    if here.exists():
        return ["node", str(here)]
    found = shutil.which("rhosigma")
    if found:
        return [found]
    raise FileNotFoundError("rhosigma command not found: set RHOSIGMA_COMMAND or install the npm package")


def to_protocol(obj: Any) -> Any:
    """Python/numpy values to protocol JSON: complex arrays become {"re", "im"}, inf becomes "Infinity"."""
    try:
        import numpy as np  # optional
    except ImportError:  # pragma: no cover - numpy is optional for plain lists
        np = None
    if np is not None and isinstance(obj, np.ndarray):
        if np.iscomplexobj(obj):
            return {"re": obj.real.tolist(), "im": obj.imag.tolist()}
        return obj.tolist()
    if np is not None and isinstance(obj, np.generic):
        return to_protocol(obj.item())
    if isinstance(obj, complex):
        raise TypeError("a lone complex number has no protocol form; put it in a matrix")
    if isinstance(obj, float) and math.isinf(obj):
        return "Infinity" if obj > 0 else "-Infinity"
    if isinstance(obj, float) and math.isnan(obj):
        raise ValueError("NaN cannot be sent to the engine")
    if isinstance(obj, dict):
        return {k: to_protocol(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [to_protocol(v) for v in obj]
    return obj


def from_protocol(obj: Any, as_numpy: bool = False) -> Any:
    """Protocol JSON to Python: "Infinity" to inf; with as_numpy, matrices to numpy arrays."""
    if obj == "Infinity":
        return math.inf
    if obj == "-Infinity":
        return -math.inf
    if isinstance(obj, dict):
        if as_numpy and set(obj) <= {"re", "im"} and "re" in obj:
            import numpy as np

            re = np.asarray(obj["re"], dtype=float)
            return re + 1j * np.asarray(obj["im"], dtype=float) if "im" in obj else re
        return {k: from_protocol(v, as_numpy) for k, v in obj.items()}
    if isinstance(obj, list):
        if as_numpy and obj and all(isinstance(r, list) and all(isinstance(x, (int, float)) for x in r) for r in obj):
            import numpy as np

            return np.asarray(obj, dtype=float)
        return [from_protocol(v, as_numpy) for v in obj]
    return obj


def compute(request: dict | Iterable[dict], *, as_numpy: bool = False, timeout: float | None = None) -> Any:
    """Answer one request (a dict) or a batch (a list of dicts), in order.

    Failed requests come back as answers with "ok": False; use `value` to raise on failure instead.
    """
    single = isinstance(request, dict)
    batch = [request] if single else list(request)
    payload = json.dumps([to_protocol(r) for r in batch])
    proc = subprocess.run(
        engine_command() + ["compute", "-"],
        input=payload,
        capture_output=True,
        text=True,
        timeout=timeout,
    )
    if proc.returncode not in (0, 1):
        raise RuntimeError(f"rhosigma compute exited with {proc.returncode}: {proc.stderr.strip()}")
    answers = json.loads(proc.stdout)
    answers = [from_protocol(a, as_numpy) for a in answers]
    return answers[0] if single else answers


def value(request: dict, *, as_numpy: bool = False, timeout: float | None = None) -> Any:
    """The headline value of one request; raises ComputeError if the engine refused it."""
    answer = compute(request, as_numpy=as_numpy, timeout=timeout)
    if not answer.get("ok"):
        raise ComputeError(answer)
    return answer["value"]
