"""The friendly functions and State/Channel against numpy 2.x (numpy.linalg.eigh / eigvalsh, LAPACK) and
textbook closed forms named beside each check."""
from __future__ import annotations

import math

import numpy as np
import pytest

import rhosigma as rs
from rhosigma import Channel, ComputeError, State

from conftest import numpy_entropy, random_density, random_hermitian


def mpow(h: np.ndarray, f) -> np.ndarray:
    """f of a Hermitian matrix through numpy.linalg.eigh."""
    w, v = np.linalg.eigh(h)
    return (v * f(np.clip(w, 0, None))) @ v.conj().T


def np_ptrace(rho: np.ndarray, dims: list[int], keep: list[int]) -> np.ndarray:
    """Partial trace by reshaping and numpy.einsum-free tracing (common practice)."""
    n = len(dims)
    t = rho.reshape(dims + dims)
    for k in sorted((i for i in range(n) if i not in keep), reverse=True):
        t = np.trace(t, axis1=k, axis2=k + t.ndim // 2)
    d = int(np.prod([dims[i] for i in keep]))
    return t.reshape(d, d)


RNG = np.random.default_rng(424242)
RHO = random_density(4, RNG)
SIGMA = random_density(4, RNG)


def test_entropies_match_numpy():
    """H(ρ) = −Σλ log2 λ and H_2(ρ) = −log2 Tr ρ² (Rényi 1961), eigenvalues from numpy.linalg.eigvalsh."""
    assert math.isclose(rs.entropy(RHO), numpy_entropy(RHO), abs_tol=1e-12)
    assert math.isclose(rs.entropy(RHO, alpha=2), -math.log2(np.trace(RHO @ RHO).real), abs_tol=1e-12)
    assert math.isclose(rs.entropy(RHO, base="e"), numpy_entropy(RHO) * math.log(2), abs_tol=1e-12)
    assert isinstance(rs.entropy(np.eye(2) / 2), float)              # a JSON 1 comes back as 1.0


def test_umegaki_divergence_fidelity_and_trace_distance_match_numpy():
    """D(ρ‖σ) = Tr ρ(log ρ − log σ) (Umegaki 1962), F = (Tr √(√ρ σ √ρ))² (Uhlmann 1976), ½‖ρ−σ‖₁; numpy.linalg.eigh."""
    log2 = lambda m: mpow(m, lambda w: np.log2(np.where(w > 0, w, 1)))
    d = np.trace(RHO @ (log2(RHO) - log2(SIGMA))).real
    assert math.isclose(rs.divergence(RHO, SIGMA), d, abs_tol=1e-10)
    s = mpow(RHO, np.sqrt)
    f = np.trace(mpow(s @ SIGMA @ s, np.sqrt)).real ** 2
    assert math.isclose(rs.fidelity(RHO, SIGMA), f, abs_tol=1e-10)
    details = rs.fidelity(RHO, SIGMA, details=True)
    assert math.isclose(details["root"], math.sqrt(f), abs_tol=1e-10) and details["ok"] is True
    td = 0.5 * np.abs(np.linalg.eigvalsh(RHO - SIGMA)).sum()
    assert math.isclose(rs.trace_distance(RHO, SIGMA), td, abs_tol=1e-12)


def test_spectrum_with_vectors_reconstructs_the_matrix():
    """H = V diag(λ) V* with λ ascending as numpy.linalg.eigvalsh gives them."""
    h = random_hermitian(6, RNG)
    values, vectors = rs.spectrum(h, vectors=True)
    assert isinstance(values, np.ndarray) and vectors.dtype == complex
    assert np.allclose(values, np.linalg.eigvalsh(h), atol=1e-12)
    assert np.allclose((vectors * values) @ vectors.conj().T, h, atol=1e-11)


def test_partial_trace_and_labels_match_numpy():
    """Tr_B by reshaping (common practice); labels stand for indices (protocol: subsystems)."""
    rho = random_density(6, RNG)
    assert np.allclose(rs.partial_trace(rho, [2, 3], over=1), np_ptrace(rho, [2, 3], [0]), atol=1e-14)
    assert np.allclose(rs.partial_trace(rho, [2, 3], keep="B", labels=["A", "B"]), np_ptrace(rho, [2, 3], [1]), atol=1e-14)


def test_conditional_mutual_information_of_ghz_is_one_bit():
    """GHZ on three qubits: I(A;C|B) = H(AB) + H(BC) − H(B) − H(ABC) = 1 + 1 − 1 − 0 = 1 (textbook)."""
    psi = np.zeros(8)
    psi[0] = psi[7] = 1 / math.sqrt(2)
    ghz = State(ket=psi, dims=[2, 2, 2], labels=["A", "B", "C"])
    assert math.isclose(rs.conditional_mutual_information(ghz, "A", "B", "C"), 1.0, abs_tol=1e-10)
    product = State(np.kron(np.kron(RHO[:2, :2] / np.trace(RHO[:2, :2]), np.eye(2) / 2), np.eye(2) / 2), dims=[2, 2, 2])
    assert abs(rs.conditional_mutual_information(product, 0, 1, 2)) < 1e-10


def test_chernoff_exponent_of_orthogonal_states_is_infinite():
    """Orthogonal supports: Tr ρ^s σ^(1−s) = 0, so ξ = +∞ (Audenaert et al. 2007), with a reason string."""
    value = rs.chernoff_exponent(np.diag([1.0, 0.0]), np.diag([0.0, 1.0]))
    assert value == math.inf and isinstance(value, float)
    assert isinstance(rs.chernoff_exponent(np.diag([1.0, 0.0]), np.diag([0.0, 1.0]), details=True)["reason"], str)


def test_channels_against_numpy():
    """Amplitude damping: N(ρ) = Σ K ρ K*, J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|) (protocol's Choi convention), numpy products."""
    gamma = 0.3
    ch = rs.channel_preset("amplitude-damping", gamma=gamma)
    assert isinstance(ch, Channel) and ch.from_dims == [2] and ch.to_dims == [2]
    k0 = np.array([[1, 0], [0, math.sqrt(1 - gamma)]])
    k1 = np.array([[0, math.sqrt(gamma)], [0, 0]])          # Nielsen & Chuang (8.108)
    rho = RHO[:2, :2] / np.trace(RHO[:2, :2])
    expected = k0 @ rho @ k0.conj().T + k1 @ rho @ k1.conj().T
    out = rs.apply_channel(ch, rho)
    assert isinstance(out, State) and np.allclose(out.matrix, expected, atol=1e-14)
    j = np.zeros((4, 4), dtype=complex)
    for i in range(2):
        for k in range(2):
            e = np.zeros((2, 2))
            e[i, k] = 1
            j += np.kron(e, k0 @ e @ k0.T + k1 @ e @ k1.T)
    choi = ch.to_choi()
    assert choi.choi is not None and np.allclose(choi.choi, j, atol=1e-14)
    checks = ch.checks()
    assert checks["completelyPositive"] and checks["tracePreserving"] and not checks["unital"]
    assert math.isclose(checks["unitalDefect"], gamma, abs_tol=1e-12)       # ‖N(I) − I‖ = γ (operator norm)


def test_guessing_two_states_is_helstrom():
    """Two states: P_guess = ½(1 + ‖p0ρ0 − p1ρ1‖₁) (Helstrom 1976); the trace norm from numpy.linalg.eigvalsh."""
    r0, r1 = random_density(2, RNG), random_density(2, RNG)
    helstrom = 0.5 * (1 + np.abs(np.linalg.eigvalsh(0.3 * r0 - 0.7 * r1)).sum())
    assert math.isclose(rs.guessing_probability([0.3, 0.7], [r0, r1]), helstrom, abs_tol=1e-7)
    p = np.array([0.1, 0.5, 0.4])
    expected = float(np.sum(np.arange(1, 4) * np.sort(p)[::-1]))           # Massey 1994: guess in decreasing order
    assert math.isclose(rs.guesswork(p), expected, abs_tol=1e-12)


def test_refusals_raise_with_code_message_and_path():
    """A refusal raises ComputeError with the protocol's code, message and path (docs/protocol.md, Answers)."""
    with pytest.raises(ComputeError) as info:
        rs.entropy(np.diag([0.5, 0.6]), dims=[2])
    assert info.value.code == "trace-not-one" and info.value.path == "rho.matrix" and "trace" in info.value.message.lower()
    with pytest.raises(ComputeError) as info:
        rs.partial_trace(np.eye(4) / 4, [2, 2], over="C", labels=["A", "B"])
    assert info.value.path is not None and info.value.path.startswith("over")
    with pytest.raises(ComputeError) as info:
        rs.call("entropy", rho=np.eye(2) / 2, vector=True)               # a typo'd field is refused, not ignored
    assert info.value.code == "invalid-argument"
    assert rs.call("entropy", rho=np.eye(2) / 2) == rs.entropy(np.eye(2) / 2) == 1.0


def test_state_and_channel_objects():
    """Shapes are checked at construction; nothing is repaired; the protocol form round-trips."""
    with pytest.raises(ValueError):
        State(np.eye(4) / 4, dims=[2, 3])
    with pytest.raises(ValueError):
        State(np.eye(4) / 4, dims=[2, 2], labels=["A", "A"])
    with pytest.raises(ValueError):
        Channel(choi=np.eye(4))
    s = State(RHO, dims=[2, 2], labels=["A", "B"])
    again = State.from_protocol(s.to_protocol())
    assert np.array_equal(again.matrix, RHO) and again.dims == [2, 2] and again.labels == ["A", "B"]
    assert "dims=[2, 2]" in repr(s) and "labels=['A', 'B']" in repr(s)
    bad = State(np.array([[0.5, 0.2], [0.2, -0.1]]))               # not positive: kept as given, reported by checks
    report = bad.checks()
    assert not report["valid"] and report["problem"]["code"] in ("not-positive", "trace-not-one")
    assert math.isclose(report["min_eigenvalue"], np.linalg.eigvalsh(bad.matrix)[0], abs_tol=1e-12)
    ch = Channel(kraus=[np.eye(2)])
    assert "Channel(from_dims=[2], to_dims=[2], 1 Kraus operator=" in repr(ch)
    assert Channel.from_protocol(ch.to_protocol()).to_dims == [2]


def test_every_friendly_function_speaks_its_ops_schema():
    """Each function names an op of the registry and only fields of that op (schema/protocol.schema.json)."""
    import inspect
    import json

    from conftest import ROOT
    from rhosigma import functions

    defs = json.loads((ROOT / "schema" / "protocol.schema.json").read_text())["$defs"]
    local = {"details", "timeout", "dims", "labels", "params"}
    for name in functions.__all__:
        if name == "call":
            continue
        op = name.replace("_", "-")
        assert f"op:{op}" in defs, f"{name}: no op {op}"
        fields = set(defs[f"op:{op}"]["properties"])
        for p in inspect.signature(getattr(functions, name)).parameters.values():
            if p.name in local or p.kind is p.VAR_POSITIONAL:
                continue
            assert functions._field(p.name) in fields, f"{name}({p.name}=...) is not a field of {op}"


def test_recovery_functions_against_numpy():
    """petz_map, data_processing and state_check through the package, each checked against numpy.

    Facts: the Petz map of (σ, N) sends N(σ) back to σ (Petz 1988, common practice to check it); data
    processing holds for the Umegaki relative entropy (Lindblad 1975, Uhlmann 1977), with both sides equal
    to the numpy values of D(ρ‖σ) = Tr ρ(log ρ − log σ) before and after the channel; a state's check names
    its most negative eigenvalue (numpy.linalg.eigvalsh)."""
    from scipy.linalg import logm

    rng = np.random.default_rng(23)
    rho, sigma = random_density(2, rng), random_density(2, rng)
    damping = rs.channel_preset("amplitude-damping", gamma=0.3)
    recovery = rs.petz_map(sigma, damping)
    back = rs.apply_channel(recovery, rs.apply_channel(damping, sigma).matrix)
    assert np.allclose(back.matrix, sigma, atol=1e-9)

    def kl(p, q):
        return float(np.real(np.trace(p @ (logm(p) - logm(q))))) / np.log(2)

    out = rs.data_processing(rho, sigma, damping)
    n_rho = rs.apply_channel(damping, rho).matrix
    n_sigma = rs.apply_channel(damping, sigma).matrix
    assert abs(out["input"]["value"] - kl(rho, sigma)) < 1e-9 and abs(out["output"]["value"] - kl(n_rho, n_sigma)) < 1e-9
    assert out["verdict"]["saturated"] is False and "not a proof" in out["verdict"]["caveat"]
    assert abs(out["value"] - (kl(rho, sigma) - kl(n_rho, n_sigma))) < 1e-9, out
    bad = np.array([[0.7, 0.5], [0.5, 0.3]])
    check = rs.state_check(bad)
    assert check["ok"] is True and check["value"] is False and check["positive"]["ok"] is False
    assert abs(check["positive"]["minEigenvalue"] - min(np.linalg.eigvalsh(bad))) < 1e-12
    assert abs(min(np.linalg.eigvalsh(bad)) - min(np.asarray(check["spectrum"], dtype=float))) < 1e-12, check
