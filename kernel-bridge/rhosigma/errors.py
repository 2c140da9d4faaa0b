"""The exceptions the rhosigma package raises, all under `RhosigmaError`.

Two kinds, kept apart on purpose:
- `ComputeError`: the engine (or this package, before sending) refused a request. It carries the
  protocol's error `code`, `message`, `path` (where in the request, "rho.matrix[1][0]") and `detail`,
  plus the whole `answer` and the `request`. `rhosigma.compute` never raises it (refusals are answers);
  the friendly functions and `Answer.raise_for_error()` do.
- `EngineError` and its subclasses: the engine process could not be found or started. These are about
  the installation, not about a request.
Nothing here talks to the engine; cost: none.
"""
from __future__ import annotations

from typing import Any

__all__ = ["RhosigmaError", "ComputeError", "EngineError", "EngineNotFound", "EngineStartError"]


class RhosigmaError(Exception):
    """Base class of every exception raised by the rhosigma package."""


class ComputeError(RhosigmaError):
    """A request refused with {"ok": false}: `code`, `message`, `path` and `detail` as in the protocol."""

    def __init__(self, answer: dict, request: Any = None):
        error = answer.get("error") or {}
        self.answer = answer
        self.request = request
        self.op = answer.get("op")
        self.code: str = error.get("code", "internal-error")
        self.message: str = error.get("message", "")
        self.path: str | None = error.get("path")
        self.detail: dict | None = error.get("detail")
        where = f" (at {self.path})" if self.path else ""
        super().__init__(f"{self.op or 'request'}: {self.code}: {self.message}{where}")


class EngineError(RhosigmaError):
    """The engine process is unavailable: not installed, not startable, or not speaking the protocol."""


class EngineNotFound(EngineError):
    """No engine command could be found or executed (node missing, bundle missing, bad $RHOSIGMA_COMMAND)."""


class EngineStartError(EngineError):
    """The engine command ran but did not become ready: it exited, timed out, or printed no ready line.

    `command` is the command line that was run, `returncode` its exit status (None if it was stopped
    while still running) and `stderr` the end of what it wrote to standard error.
    """

    def __init__(self, message: str, *, command: list[str] | None = None, returncode: int | None = None, stderr: str = ""):
        self.command = command
        self.returncode = returncode
        self.stderr = stderr
        text = message
        if stderr.strip():
            text += f"\n--- the engine's standard error ---\n{stderr.rstrip()}"
        super().__init__(text)
