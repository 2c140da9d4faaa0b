"""Conversions between Python values and the protocol's JSON data (docs/protocol.md, "Values"), checked
against Python's json module and numpy's own bytes (numpy.ndarray.tobytes)."""
from __future__ import annotations

import base64
import json
import math

import numpy as np
import pytest

from rhosigma.convert import PACK_MIN_ENTRIES, Refusal, dumps_line, from_protocol, pack_matrix, to_numpy, to_protocol, unpack_matrix


def test_packed_form_is_numpys_little_endian_bytes():
    """"re"/"im" are base64 of numpy.ascontiguousarray(M, "<f8").tobytes() (protocol: packed matrix)."""
    rng = np.random.default_rng(1)
    m = rng.normal(size=(20, 30)) + 1j * rng.normal(size=(20, 30))
    packed = pack_matrix(m)
    assert packed["shape"] == [20, 30] and packed["packed"] == "float64-le"
    assert base64.b64decode(packed["re"]) == np.ascontiguousarray(m.real, "<f8").tobytes()
    assert base64.b64decode(packed["im"]) == np.ascontiguousarray(m.imag, "<f8").tobytes()
    assert np.array_equal(unpack_matrix(packed), m)                       # exact round trip
    assert "im" not in pack_matrix(np.eye(3) + 0j)                        # a zero imaginary part is left out


def test_small_arrays_travel_as_rows_and_large_ones_packed():
    side = int(math.isqrt(PACK_MIN_ENTRIES))
    assert to_protocol(np.array([[1, 1j], [-1j, 2]])) == {"re": [[1.0, 0.0], [0.0, 2.0]], "im": [[0.0, 1.0], [-1.0, 0.0]]}
    assert to_protocol(np.eye(side - 1)) == np.eye(side - 1).tolist()
    assert to_protocol(np.eye(side))["packed"] == "float64-le"
    assert to_protocol([[1, 1j], [0, 1]]) == {"re": [[1.0, 0.0], [0.0, 1.0]], "im": [[0.0, 1.0], [0.0, 0.0]]}
    assert to_protocol({"alpha": math.inf, "z": -math.inf, "n": np.int64(3)}) == {"alpha": "Infinity", "z": "-Infinity", "n": 3}
    with pytest.raises(Refusal) as info:
        to_protocol({"rho": {"matrix": [[1.0, math.nan]]}})
    assert info.value.path == "rho.matrix[0][1]" and info.value.code == "invalid-argument"
    with pytest.raises(Refusal):
        to_protocol({"x": 1j})


def test_dumps_line_gives_the_same_bytes_as_json_dumps():
    """Splicing the packed strings changes nothing: byte-identical to json.dumps (Python's json module)."""
    rng = np.random.default_rng(2)
    big = rng.normal(size=(40, 40)) + 1j * rng.normal(size=(40, 40))
    for request in (
        {"op": "spectrum", "matrix": big, "id": "ρ"},
        {"op": "x", "states": [big, {"matrix": big.real}], "id": "a\x00b"},       # a NUL elsewhere: plain path
        {"op": "x", "id": "\x000\x00", "m": big},                                  # a NUL that looks like a token
        {"op": "entropy", "rho": [[1, 0], [0, 0]]},
    ):
        data = to_protocol(request)
        assert dumps_line(data) == json.dumps(data, separators=(",", ":")).encode("utf-8") + b"\n"


def test_infinity_only_where_numbers_are():
    """Numeric "Infinity" becomes inf; text fields (id, labels, reason, name...) keep their strings."""
    answer = {"ok": True, "op": "x", "id": "Infinity", "value": "Infinity", "bounds": {"upper": "-Infinity"},
              "labels": ["Infinity"], "reason": "Infinity", "state": {"dims": [2], "labels": ["-Infinity"]}}
    got = from_protocol(answer)
    assert got["value"] == math.inf and got["bounds"]["upper"] == -math.inf
    assert got["id"] == "Infinity" and got["labels"] == ["Infinity"] and got["reason"] == "Infinity"
    assert got["state"]["labels"] == ["-Infinity"]
    n = to_numpy({"value": [[1, 0], [0, 1]], "vectors": {"re": [[1, 0], [0, 1]], "im": [[0, 1], [0, 0]]}, "dims": [2, 2], "order": [1, 0]})
    assert n["value"].dtype == float and n["vectors"].dtype == complex and n["dims"] == [2, 2] and n["order"] == [1, 0]
