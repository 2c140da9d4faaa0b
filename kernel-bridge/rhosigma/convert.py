"""Conversions between Python values and the protocol's plain JSON data (docs/protocol.md, "Values").

Requests (`to_protocol`):
- numpy arrays: 2-D real or complex arrays with at least `PACK_MIN_ENTRIES` entries travel in the packed
  form {"shape", "packed": "float64-le", "re", "im"} (base64 of the little-endian float64 bytes, exact);
  smaller ones as rows of numbers or {"re", "im"} rows. 1-D arrays become lists (kets, probabilities),
  3-D arrays lists of matrices (Kraus operators, ensembles). Lists of rows holding Python complex numbers
  become {"re", "im"} too. Objects with a `to_protocol()` method (State, Channel) give their own form.
- float('inf') / -inf become "Infinity" / "-Infinity", the protocol's spelling of an infinite number.
- A NaN (or an infinite matrix entry) is refused for that request alone, with the protocol's
  'invalid-argument' code and the path of the entry: `Refusal` is raised and the engine module turns it
  into that request's answer, so the other requests of a batch are still answered.

Answers (`from_protocol`): "Infinity" / "-Infinity" become float('inf') / -inf only where the protocol
puts a number. Strings under the keys in `STRING_FIELDS` (ids, labels, reasons, messages, names...) are
never touched, so an id or a label spelled "Infinity" stays a string. `to_numpy` further turns matrices
(rows, {"re", "im"}, packed) into numpy arrays, keeping index lists (dims, subsystems, shape) as lists.

Deliberately not here: any numerics beyond copying numbers, and any I/O. Cost: one walk over the data;
packed arrays cost one byte copy and base64.
"""
from __future__ import annotations

import base64
import json
import math
from typing import Any

import numpy as np

__all__ = [
    "PACK_MIN_ENTRIES",
    "STRING_FIELDS",
    "INDEX_FIELDS",
    "Refusal",
    "to_protocol",
    "from_protocol",
    "to_numpy",
    "pack_matrix",
    "unpack_matrix",
    "dumps_line",
]

#: 2-D arrays with at least this many entries are sent packed (smaller ones read better as rows).
PACK_MIN_ENTRIES = 256

#: Keys whose string values (and the strings in lists under them) are text, never numbers.
STRING_FIELDS = frozenset({
    "id", "op", "labels", "reason", "reasons", "message", "code", "path", "name", "family", "status",
    "form", "metric", "convention", "conventions", "engine", "version", "protocol", "packed", "basis",
    "note", "notes", "warning", "warnings", "method", "strategy", "formula", "description",
})

#: Keys holding lists of indices or dimensions: kept as Python lists by `to_numpy`.
INDEX_FIELDS = frozenset({
    "dims", "from", "to", "shape", "order", "on", "over", "keep", "a", "b", "c", "labels", "blocks",
    "multiplicities", "traceOut", "rank", "ranks",
})


class Refusal(Exception):
    """A request that cannot be sent as it is: carries the protocol error it is answered with."""

    def __init__(self, code: str, message: str, path: str | None):
        super().__init__(message)
        self.code = code
        self.message = message
        self.path = path

    def error(self) -> dict:
        out: dict[str, Any] = {"code": self.code, "message": self.message}
        if self.path:
            out["path"] = self.path
        return out


def _key_path(base: str, key: str) -> str:
    return key if base == "" else f"{base}.{key}"


def _index_path(base: str, index: tuple[int, ...]) -> str:
    return base + "".join(f"[{i}]" for i in index)


def _b64(values: np.ndarray) -> str:
    return base64.b64encode(np.ascontiguousarray(values, dtype="<f8")).decode("ascii")


def pack_matrix(matrix: np.ndarray) -> dict:
    """The packed form of a real or complex 2-D array (exact: the float64 bytes themselves)."""
    m = np.asarray(matrix)
    if m.ndim != 2:
        raise ValueError(f"a packed matrix is 2-D, not {m.ndim}-D")
    out: dict[str, Any] = {"shape": [int(m.shape[0]), int(m.shape[1])], "packed": "float64-le"}
    if np.iscomplexobj(m):
        out["re"] = _b64(m.real)
        if np.any(m.imag != 0):
            out["im"] = _b64(m.imag)
    else:
        out["re"] = _b64(m)
    return out


def unpack_matrix(packed: dict) -> np.ndarray:
    """A numpy array from the packed form: float64, or complex128 when "im" is present."""
    rows, cols = (int(n) for n in packed["shape"])
    re = np.frombuffer(base64.b64decode(packed["re"]), dtype="<f8").reshape(rows, cols).astype(float)
    if "im" not in packed:
        return re
    im = np.frombuffer(base64.b64decode(packed["im"]), dtype="<f8").reshape(rows, cols)
    return re + 1j * im


def _check_finite(a: np.ndarray, path: str) -> None:
    bad = ~np.isfinite(a)
    if bad.any():
        where = tuple(int(i) for i in np.argwhere(bad)[0])
        value = a[where]
        what = "NaN" if np.isnan(value) else "infinite"
        raise Refusal(
            "invalid-argument",
            f"The entry is {what}; matrix, ket and list entries must be finite numbers.",
            _index_path(path, where),
        )


def _array(a: np.ndarray, path: str) -> Any:
    if a.dtype == object:
        return _value(a.tolist(), path)
    if a.dtype.kind not in "biufc":
        raise Refusal("invalid-argument", f"A numpy array of dtype {a.dtype} has no protocol form.", path or None)
    if a.ndim == 0:
        return _value(a.item(), path)
    if a.dtype.kind == "c":
        _check_finite(a.real, path)
        _check_finite(a.imag, path)
    elif a.dtype.kind == "f":
        _check_finite(a, path)
    if a.ndim == 1:
        if a.dtype.kind == "c":
            return {"re": a.real.tolist(), "im": a.imag.tolist()}
        return a.tolist()
    if a.ndim == 2:
        if a.dtype.kind in "fc" and a.size >= PACK_MIN_ENTRIES:
            return pack_matrix(a)
        if a.dtype.kind == "c":
            if np.any(a.imag != 0):
                return {"re": a.real.tolist(), "im": a.imag.tolist()}
            return a.real.tolist()
        return a.tolist()
    return [_array(a[k], _index_path(path, (k,))) for k in range(a.shape[0])]


def _rows_with_complex(obj: list) -> bool:
    return (
        len(obj) > 0
        and all(isinstance(r, (list, tuple)) for r in obj)
        and any(isinstance(x, complex) for r in obj for x in r)
        and all(isinstance(x, (int, float, complex)) and not isinstance(x, bool) for r in obj for x in r)
    )


def _value(obj: Any, path: str) -> Any:
    if obj is None or isinstance(obj, (str, bool, int)):
        return obj
    if isinstance(obj, float):
        if math.isnan(obj):
            raise Refusal("invalid-argument", "The number is NaN; the protocol has no NaN.", path or None)
        if math.isinf(obj):
            return "Infinity" if obj > 0 else "-Infinity"
        return obj
    if isinstance(obj, np.ndarray):
        return _array(obj, path)
    if isinstance(obj, np.generic):
        return _value(obj.item(), path)
    if isinstance(obj, dict):
        out = {}
        for k, v in obj.items():
            if not isinstance(k, str):
                raise Refusal("invalid-argument", f"Request keys are strings, not {type(k).__name__}.", path or None)
            out[k] = _value(v, _key_path(path, k))
        return out
    if isinstance(obj, (list, tuple)):
        if _rows_with_complex(list(obj)):
            try:
                return _array(np.asarray(obj, dtype=complex), path)
            except ValueError:
                pass  # ragged rows: sent as they are, the engine names the row
        return [_value(v, _index_path(path, (i,))) for i, v in enumerate(obj)]
    if isinstance(obj, complex):
        raise Refusal(
            "invalid-argument",
            "A lone complex number has no protocol form; complex entries belong in a matrix or ket.",
            path or None,
        )
    if hasattr(obj, "to_protocol"):
        return _value(obj.to_protocol(), path)
    raise Refusal("invalid-argument", f"A value of type {type(obj).__name__} has no protocol form.", path or None)


def to_protocol(obj: Any) -> Any:
    """Python and numpy values to protocol JSON data; raises `Refusal` for NaN and unsendable values."""
    return _value(obj, "")


_SPLICE_MIN = 4096


def _lift_packed(obj: Any, lifted: list[str]) -> Any:
    """A copy of `obj` whose long packed strings are replaced by numbered tokens (for dumps_line)."""
    if isinstance(obj, dict):
        if obj.get("packed") == "float64-le":
            out = dict(obj)
            for part in ("re", "im"):
                text = out.get(part)
                if isinstance(text, str) and len(text) >= _SPLICE_MIN:
                    out[part] = f"\x00{len(lifted)}\x00"
                    lifted.append(text)
            return out
        return {k: _lift_packed(v, lifted) for k, v in obj.items()}
    if isinstance(obj, list):
        return [_lift_packed(v, lifted) for v in obj]
    return obj


def dumps_line(data: Any) -> bytes:
    """Protocol JSON data as one line of UTF-8 JSON (newline included), as `rhosigma serve` reads it.

    json.dumps scans every character of a string for escapes, which makes a large packed matrix cost
    more than the rest of the request; base64 needs no escaping, so long packed strings are spliced
    into the encoded line as they are. Same bytes as json.dumps(data, separators=(",", ":")).
    """
    lifted: list[str] = []
    skeleton = _lift_packed(data, lifted)
    text = json.dumps(skeleton, separators=(",", ":"), allow_nan=False).encode("utf-8")
    if not lifted:
        return text + b"\n"
    parts = text.split(b"\\u0000")
    # parts alternate: text, index, text, ... A NUL character anywhere else in the request would be
    # escaped as \u0000 too and upset the count: then the plain encoding is used instead.
    if len(parts) != 2 * len(lifted) + 1 or any(parts[i] != str(i // 2).encode() for i in range(1, len(parts), 2)):
        return json.dumps(data, separators=(",", ":"), allow_nan=False).encode("utf-8") + b"\n"
    out = [lifted[i // 2].encode("ascii") if i % 2 else piece for i, piece in enumerate(parts)]
    return b"".join(out) + b"\n"


def from_protocol(obj: Any, _key: str | None = None) -> Any:
    """Protocol JSON data to Python data: numeric "Infinity" / "-Infinity" to ±inf, text left alone."""
    if isinstance(obj, str):
        if _key in STRING_FIELDS:
            return obj
        if obj == "Infinity":
            return math.inf
        if obj == "-Infinity":
            return -math.inf
        return obj
    if isinstance(obj, dict):
        return {k: from_protocol(v, k) for k, v in obj.items()}
    if isinstance(obj, list):
        return [from_protocol(v, _key) for v in obj]
    return obj


def _numeric(x: Any) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


def _matrix_rows(obj: Any) -> bool:
    if not isinstance(obj, list) or not obj or not all(isinstance(r, list) and r for r in obj):
        return False
    width = len(obj[0])
    return all(len(r) == width and all(_numeric(x) for x in r) for r in obj)


def to_numpy(obj: Any, _key: str | None = None) -> Any:
    """Like `from_protocol`, and matrices and number lists become numpy arrays (index lists stay lists)."""
    if isinstance(obj, dict):
        keys = set(obj)
        if obj.get("packed") == "float64-le" and "shape" in obj:
            return unpack_matrix(obj)
        if keys in ({"re"}, {"re", "im"}) and (_matrix_rows(obj["re"]) or (isinstance(obj["re"], list) and all(_numeric(x) for x in obj["re"]))):
            re = np.asarray(obj["re"], dtype=float)
            return re + 1j * np.asarray(obj["im"], dtype=float) if "im" in obj else re.astype(complex)
        return {k: to_numpy(v, k) for k, v in obj.items()}
    if isinstance(obj, list):
        if _key in INDEX_FIELDS or _key in STRING_FIELDS:
            return from_protocol(obj, _key)
        if _matrix_rows(obj):
            return np.asarray(obj, dtype=float)
        if obj and all(_numeric(x) or x in ("Infinity", "-Infinity") for x in obj):
            return np.asarray([from_protocol(x) for x in obj], dtype=float)
        return [to_numpy(v, _key) for v in obj]
    return from_protocol(obj, _key)
