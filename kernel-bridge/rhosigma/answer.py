"""`Answer`: a protocol answer as a plain dict, with the request it answers kept beside it.

An `Answer` *is* the answer's plain data (a dict subclass: it compares equal to the same dict, and
`json.dumps` writes it as the protocol's answer once infinities are put back as "Infinity" by
`to_protocol_data`). Numeric "Infinity" arrives as float('inf') (rhosigma.convert.from_protocol); ids,
labels and reasons stay strings. `request` is not a key, so the data stays exactly the engine's answer.

Deliberately not here: display (rhosigma.display registers it with IPython) and any computing.
Cost: one walk over the answer.
"""
from __future__ import annotations

import math
from typing import Any

from .convert import from_protocol, to_numpy
from .errors import ComputeError

__all__ = ["Answer"]


class Answer(dict):
    """A protocol answer: {"ok": True, "op", "value", ...} or {"ok": False, "op", "error": {...}}."""

    __slots__ = ("request",)

    def __init__(self, data: dict, request: Any = None):
        super().__init__(data)
        #: The request this answers, as it was given (numpy arrays and all), or None.
        self.request = request

    @classmethod
    def from_protocol(cls, data: dict, request: Any = None) -> "Answer":
        """From the engine's JSON data: numeric "Infinity" → float('inf')."""
        return cls(from_protocol(data), request)

    @property
    def ok(self) -> bool:
        return self.get("ok") is True

    @property
    def value(self) -> Any:
        """The headline value; raises `ComputeError` if the request was refused."""
        self.raise_for_error()
        return self["value"]

    @property
    def error(self) -> dict | None:
        return self.get("error")

    def raise_for_error(self) -> "Answer":
        """Raise `ComputeError` (code, message, path, detail) for a refusal; return self otherwise."""
        if not self.ok:
            raise ComputeError(dict(self), self.request)
        return self

    def numpy(self) -> dict:
        """The answer with matrices as numpy arrays (index lists such as dims stay lists)."""
        return to_numpy(dict(self))

    def to_protocol_data(self) -> dict:
        """The answer as protocol JSON data again (float('inf') → "Infinity")."""
        return _back(dict(self))

    def __repr__(self) -> str:
        return f"Answer({dict.__repr__(self)})"


def _back(obj: Any) -> Any:
    if isinstance(obj, float) and math.isinf(obj):
        return "Infinity" if obj > 0 else "-Infinity"
    if isinstance(obj, dict):
        return {k: _back(v) for k, v in obj.items()}
    if isinstance(obj, list):
        return [_back(v) for v in obj]
    return obj
