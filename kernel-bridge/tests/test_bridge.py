"""The Python bridge against numpy (numpy from PyPI): values sent through the real engine process."""
import math

import numpy as np
import pytest

from rhosigma_bridge import ComputeError, compute, from_protocol, to_protocol, value


def random_density(d, rng):
    g = rng.normal(size=(d, d)) + 1j * rng.normal(size=(d, d))
    p = g @ g.conj().T
    return p / np.trace(p).real


def test_spectrum_matches_numpy_eigvalsh():
    """Eigenvalues of a random Hermitian matrix agree with numpy.linalg.eigvalsh (numpy %s)."""
    rng = np.random.default_rng(7)
    h = rng.normal(size=(5, 5)) + 1j * rng.normal(size=(5, 5))
    h = h + h.conj().T
    got = value({"op": "spectrum", "matrix": h})
    assert np.allclose(got, np.linalg.eigvalsh(h), rtol=1e-10, atol=1e-10), np.__version__


def test_batch_keeps_order_and_reports_failures():
    """A batch is answered in order; a bad request fails alone with a structured error (PROTOCOL.md)."""
    rng = np.random.default_rng(8)
    rho = random_density(3, rng)
    answers = compute([
        {"op": "spectrum", "matrix": rho},
        {"op": "spectrum", "matrix": [[1, 2], [3, 4]]},
        {"op": "no-such-op"},
    ])
    assert answers[0]["ok"] and np.allclose(answers[0]["value"], np.linalg.eigvalsh(rho))
    assert not answers[1]["ok"] and answers[1]["error"]["code"] == "not-hermitian"
    assert not answers[2]["ok"] and answers[2]["error"]["code"] == "unknown-op"
    with pytest.raises(ComputeError) as info:
        value({"op": "no-such-op"})
    assert info.value.code == "unknown-op"


def test_protocol_conversions():
    """Complex arrays travel as {re, im}; infinities as the protocol's strings (PROTOCOL.md, Values)."""
    m = np.array([[1, 1j], [-1j, 2]])
    assert to_protocol(m) == {"re": [[1.0, 0.0], [0.0, 2.0]], "im": [[0.0, 1.0], [-1.0, 0.0]]}
    assert to_protocol({"x": math.inf}) == {"x": "Infinity"}
    back = from_protocol(to_protocol(m), as_numpy=True)
    assert np.array_equal(back, m)
    assert from_protocol("-Infinity") == -math.inf
    with pytest.raises(ValueError):
        to_protocol(float("nan"))
