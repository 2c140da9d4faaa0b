"""The independent numpy checker (rhosigma.certificates) against real engine answers.

Facts checked:
- it imports numpy and the standard library only (no engine code path);
- it certifies every answer of the committed reference suites (cvxopt 1.3.0 instances of
  scripts/reference/cvxopt_oneshot.py and cvxopt_guessing.py; the 50-digit mpmath closed forms of
  scripts/reference/mpmath_hypothesis.py at ε ∈ {1e-9, 1e-6, 1e-3, 0.999, 1 − 1e-6, 1 − 1e-9}), and the
  outside reference value lies in the bracket it recomputes;
- it rejects answers whose points, value or stated bracket were tampered with;
- its command reads requests and answers and exits 1 when one is not certified.
"""
from __future__ import annotations

import ast
import copy
import importlib.util
import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from conftest import ROOT, cli_compute, random_density

MODULE = ROOT / "kernel-bridge" / "rhosigma" / "certificates.py"
DATA = ROOT / "test" / "reference" / "data"


def _load():
    spec = importlib.util.spec_from_file_location("rhosigma_certificates_under_test", MODULE)
    mod = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = mod
    spec.loader.exec_module(mod)
    return mod


C = _load()


def _mat(m: np.ndarray) -> dict:
    return {"re": np.real(m).tolist(), "im": np.imag(m).tolist()}


def reference_requests() -> list[tuple[dict, float | None, str]]:
    """(request, outside reference value, its source) for every committed SDP reference case."""
    out: list[tuple[dict, float | None, str]] = []
    one = json.loads((DATA / "oneshot-cases.json").read_text())
    src = f"cvxopt {one['cvxopt']} ({one['generator']})"
    for c in one["cases"]:
        k = c["kind"]
        if k == "hypothesis-testing":
            r = {"op": "divergence", "family": "hypothesis-testing", "rho": c["rho"], "sigma": c["sigma"], "epsilon": c["epsilon"]}
        elif k == "smooth-max-divergence":
            r = {"op": k, "rho": c["rho"], "sigma": c["sigma"], "epsilon": c["epsilon"]}
        else:
            r = {"op": k, "rho": {"matrix": c["rho"], "dims": c["dims"]}, "a": [0], "b": [1]}
        out.append((r, float(c["value"]), f"{src}: {c['name']}"))
    g = json.loads((DATA / "guessing-cases.json").read_text())
    gsrc = f"cvxopt {g['cvxopt']} ({g['generator']})"
    for i, c in enumerate(g["guessing"]):
        out.append(({"op": "guessing-probability", "probabilities": c["probabilities"], "states": c["states"]}, float(c["value"]), f"{gsrc}: guessing #{i}"))
    for i, c in enumerate(g["diamond"]):
        out.append(({"op": "diamond-distance", "a": c["a"], "b": c["b"]}, float(c["value"]), f"{gsrc}: diamond #{i}"))
    for i, c in enumerate(g["recovery"]):
        r = {"op": "fidelity-of-recovery", "rho": c["rho"], "a": c["a"], "b": c["b"], "c": c["c"]}
        out.append((r, float(c["value"]), f"{gsrc}: recovery #{i}"))
    gw = json.loads((DATA / "guesswork-cases.json").read_text())
    gwsrc = f"cvxopt {gw['cvxopt']} ({gw['generator']})"
    for c in gw["cases"]:
        r = {"op": "guesswork", "probabilities": c["probabilities"], "states": c["states"], "moment": c["moment"]}
        out.append((r, float(c["value"]), f"{gwsrc}: {c['name']}"))
    h = json.loads((DATA / "hypothesis-closed-forms.json").read_text())
    hsrc = f"mpmath {h['mpmath']}, {h['digits']} digits ({h['generator']})"
    for c in h["cases"]:
        r = {"op": "divergence", "family": "hypothesis-testing", "rho": c["rho"], "sigma": c["sigma"], "epsilon": c["epsilon"]}
        out.append((r, float(c["value"]), f"{hsrc}: {c['name']}"))
    return out


@pytest.fixture(scope="module")
def answered() -> list[tuple[dict, dict, float | None, str]]:
    cases = reference_requests()
    answers = cli_compute([r for r, _, _ in cases])
    return [(r, a, v, s) for (r, v, s), a in zip(cases, answers)]


def test_imports_numpy_and_the_standard_library_only():
    tree = ast.parse(MODULE.read_text())
    names = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names |= {a.name.split(".")[0] for a in node.names}
        elif isinstance(node, ast.ImportFrom):
            names.add((node.module or "").split(".")[0])
    assert names <= {"__future__", "base64", "fractions", "itertools", "json", "math", "sys", "typing", "numpy"}, names


def test_certifies_every_reference_answer_and_the_reference_value_lies_in_its_bracket(answered):
    assert len(answered) >= 80
    for r, a, ref, src in answered:
        assert a["ok"], (src, a.get("error"))
        v = C.check(r, a)
        assert v["certified"], (src, [c for c in v["checks"] if not c["ok"]])
        lo, hi = float(v["lower"]), float(v["upper"])
        # cvxopt answers carry their own solver tolerance (1e-9..1e-10 relative); mpmath's are exact to 50 digits.
        slack = 0.0 if src.startswith("mpmath") else 2e-8 * max(1.0, abs(ref))
        assert lo - slack <= ref <= hi + slack, (src, lo, ref, hi)


def _perturb(m, rng, size):
    x = C.matrix(m)
    h = rng.normal(size=x.shape) + 1j * rng.normal(size=x.shape)
    if x.shape[0] == x.shape[1]:
        h = (h + h.conj().T) / 2
    return _mat(x + size * h / np.linalg.norm(h) * max(1.0, np.linalg.norm(x)))


def _is_matrix(x) -> bool:
    if isinstance(x, dict):
        return "re" in x or "packed" in x
    return isinstance(x, list) and bool(x) and isinstance(x[0], list) and bool(x[0]) and isinstance(x[0][0], (int, float))


def _tampered(a: dict, rng, which: str) -> dict:
    """The answer with every entry of one point moved by 1e-3 (relative): numbers scaled, matrices and lists of them perturbed."""
    b = copy.deepcopy(a)
    point = b["certificate"][which]
    for k, x in point.items():
        if k == "orders":  # guesswork's guessing orders: the first one reversed
            point[k] = [list(reversed(x[0]))] + x[1:]
        elif isinstance(x, (int, float)):
            point[k] = x * (1 + 1e-3) + 1e-3
        elif _is_matrix(x):
            point[k] = _perturb(x, rng, 1e-3)
        elif isinstance(x, list):
            point[k] = [_perturb(m, rng, 1e-3) for m in x]
    return b


def test_rejects_answers_whose_primal_or_dual_point_was_perturbed(answered):
    rng = np.random.default_rng(11)
    for r, a, _, src in answered[::3]:
        for which in ("primal", "dual"):
            v = C.check(r, _tampered(a, rng, which))
            assert not v["certified"], (src, which, v["lower"], v["upper"], a["value"])


def test_rejects_a_value_moved_out_of_its_bracket_and_a_bracket_claimed_narrower_than_the_points_prove(answered):
    for r, a, _, src in answered[::4]:
        b = copy.deepcopy(a)
        bounds = b["certificate"]["bounds"]
        width = float(bounds["upper"]) - float(bounds["lower"])
        b["value"] = float(a["value"]) + 10 * width + 1e-6 * max(1.0, abs(float(a["value"])))
        assert not C.check(r, b)["certified"], src
        c = copy.deepcopy(a)
        mid = float(a["value"])
        c["certificate"]["bounds"] = {"lower": mid - 1e-3 * width, "upper": mid + 1e-3 * width}
        if width > 1e-13 * max(1.0, abs(mid)):
            assert not C.check(r, c)["certified"], src


def test_reports_answers_without_points_as_not_checkable_never_as_certified():
    """Guesswork without side information is a closed form (Massey 1994): no SDP, no points, nothing to check."""
    req = {"op": "guesswork", "probabilities": [0.5, 0.3, 0.2]}
    (a,) = cli_compute([req])
    assert a["ok"], a
    v = C.check(req, a)
    assert v["certified"] is False and v.get("checkable") is False


def test_checks_infinite_answers_by_their_support_statement():
    reqs = [
        {"op": "divergence", "family": "hypothesis-testing", "rho": [[0.5, 0], [0, 0.5]], "sigma": [[1, 0], [0, 0]], "epsilon": 0.6},
        {"op": "smooth-max-divergence", "rho": [[0.5, 0], [0, 0.5]], "sigma": [[1, 0], [0, 0]], "epsilon": 0.5},
    ]
    for r, a in zip(reqs, cli_compute(reqs)):
        assert a["value"] == "Infinity", a
        assert C.check(r, a)["certified"], a
    # The same answers claimed for a σ of full rank are refused.
    for r, a in zip(reqs, cli_compute(reqs)):
        r2 = dict(r, sigma=[[0.9, 0], [0, 0.1]])
        assert not C.check(r2, a)["certified"]


def test_the_command_prints_one_verdict_per_answer_and_exits_1_on_a_tampered_one(tmp_path, answered):
    r, a, _, _ = answered[0]
    bad = _tampered(a, np.random.default_rng(2), "dual")
    (tmp_path / "req.json").write_text(json.dumps([r, r]))
    (tmp_path / "ans.jsonl").write_text(json.dumps(a) + "\n" + json.dumps(bad) + "\n")
    p = subprocess.run([sys.executable, str(MODULE), str(tmp_path / "req.json"), str(tmp_path / "ans.jsonl")], capture_output=True, text=True)
    lines = [json.loads(x) for x in p.stdout.splitlines()]
    assert p.returncode == 1, p.stderr
    assert [x["certified"] for x in lines] == [True, False]
    (tmp_path / "one.json").write_text(json.dumps([a]))
    (tmp_path / "r1.json").write_text(json.dumps([r]))
    assert subprocess.run([sys.executable, str(MODULE), str(tmp_path / "r1.json"), str(tmp_path / "one.json")], capture_output=True).returncode == 0


def _haar(d: int, rng) -> np.ndarray:
    q, r = np.linalg.qr(rng.normal(size=(d, d)) + 1j * rng.normal(size=(d, d)))
    return q * (np.diag(r) / abs(np.diag(r)))


def test_nearly_pure_and_nearly_orthogonal_inputs_match_their_closed_forms_and_are_certified():
    """Pure ψ_AB with Schmidt coefficients (1 − p, p), p ∈ {1e-8, 1e-6, 1e-3}, under random local unitaries:
    H_max(A|B) = −H_min(A) = log₂(1 − p) and H_min(A|B) = −2 log₂(√(1−p) + √p) (König, Renner & Schaffner 2009,
    pure-state duality and the singlet-fraction form); I_max(A:B) = 2 log₂ 2 for Schmidt rank 2 (derived: ψψ* ⪯ λ ρ_A ⊗ σ_B
    iff λ ≥ Σ_i 1/s_i, least at σ_B uniform). Commuting diag(1 − 2t, t, t), diag(t, t, 1 − 2t): F = (2√((1−2t)t) + t)²
    (the Bhattacharyya coefficient; Nielsen & Chuang §9.2.2)."""
    rng = np.random.default_rng(7)
    reqs, exact = [], []
    for p in (1e-8, 1e-6, 1e-3):
        psi = np.kron(_haar(2, rng), _haar(2, rng)) @ np.array([np.sqrt(1 - p), 0, 0, np.sqrt(p)])
        st = {"matrix": _mat(np.outer(psi, psi.conj())), "dims": [2, 2]}
        reqs += [{"op": "conditional-max-entropy", "rho": st, "a": [0], "b": [1]},
                 {"op": "conditional-min-entropy", "rho": st, "a": [0], "b": [1]},
                 {"op": "max-information", "rho": st, "a": [0], "b": [1]}]
        exact += [np.log2(1 - p), -2 * np.log2(np.sqrt(1 - p) + np.sqrt(p)), 2.0]
    for t in (1e-8, 1e-6):
        reqs.append({"op": "fidelity-sdp", "rho": np.diag([1 - 2 * t, t, t]).tolist(), "sigma": np.diag([t, t, 1 - 2 * t]).tolist()})
        exact.append((2 * np.sqrt((1 - 2 * t) * t) + t) ** 2)
    for r, a, e in zip(reqs, cli_compute(reqs), exact):
        assert a["ok"], (r["op"], a.get("error"))
        v = C.check(r, a)
        assert v["certified"], (r["op"], [c for c in v["checks"] if not c["ok"]])
        b = a["certificate"]["bounds"]
        assert b["lower"] <= e <= b["upper"], (r["op"], e, b)
        assert abs(a["value"] - e) <= 1e-6 * abs(e) + 1e-12, (r["op"], a["value"], e)


def test_the_engines_verify_answer_op_gives_the_same_verdicts_as_numpy(answered):
    """The op verify-answer (the engine's twin, same rules) and this numpy checker agree on real and tampered answers."""
    rng = np.random.default_rng(13)
    pairs = []
    for r, a, _, _ in answered[::5]:
        pairs.append((r, a))
        pairs.append((r, _tampered(a, rng, "dual")))
    verdicts = cli_compute([{"op": "verify-answer", "request": r, "answer": a} for r, a in pairs])
    for (r, a), v in zip(pairs, verdicts):
        assert v["ok"], v
        assert v["value"] == C.check(r, a)["certified"], (r["op"], v["checks"])


# ---------------------------------------------------------------------------------------------------
# Fidelity of recovery F(A;C|B) (Seshadreesan & Wilde, Phys. Rev. A 92, 042321 (2015)) and values at the end of their range.


def _kraus_of_choi(J: np.ndarray, din: int, dout: int) -> list[np.ndarray]:
    """Kraus operators of a Choi matrix J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|) (input first): K_k = √λ_k · unvec(v_k), from J's
    eigenvectors (Choi 1975; the vectorisation index (i, o) ↦ K[o, i])."""
    w, v = np.linalg.eigh(J)
    return [np.sqrt(x) * v[:, k].reshape(din, dout).T for k, x in enumerate(w) if x > 1e-14]


def _random_channel(din: int, dout: int, rng, kraus: int = 3) -> np.ndarray:
    """A random channel's Choi matrix, from a random isometry's Kraus operators (Stinespring; common practice)."""
    g = rng.normal(size=(dout * kraus, din)) + 1j * rng.normal(size=(dout * kraus, din))
    q, _ = np.linalg.qr(g)
    ks = [q[k * dout:(k + 1) * dout, :] for k in range(kraus)]
    J = np.zeros((din * dout, din * dout), dtype=complex)
    for k in ks:
        vec = k.T.reshape(-1)
        J += np.outer(vec, vec.conj())
    return J


def test_the_recovery_maps_match_the_channel_applied_by_its_kraus_operators_and_their_adjoint_identity():
    """σ(J) = (id_A ⊗ R)(ρ_AB) = Σ_k (1 ⊗ K_k) ρ_AB (1 ⊗ K_k)* (Kraus form, Nielsen & Chuang §8.2.3) for the checker's
    einsum form, and Tr σ(J)W = Tr K(W)J for its dual operator (the defining identity), on random ρ_AB, J, W."""
    rng = np.random.default_rng(21)
    for da, db, dc in ((2, 2, 2), (1, 2, 3), (3, 2, 1)):
        do = db * dc
        rab = random_density(da * db, rng)
        J = _random_channel(db, do, rng)
        ks = _kraus_of_choi(J, db, do)
        by_kraus = sum(np.kron(np.eye(da), k) @ rab @ np.kron(np.eye(da), k).conj().T for k in ks)
        assert np.allclose(C.recovered_state(rab, J, da, db, do), by_kraus, atol=1e-12)
        W = random_density(da * do, rng)
        lhs = np.trace(C.recovered_state(rab, J, da, db, do) @ W)
        rhs = np.trace(C.recovery_dual_operator(rab, W, da, db, do) @ J)
        assert abs(lhs - rhs) <= 1e-12


def test_fidelity_of_recovery_answers_are_certified_and_each_perturbed_point_is_rejected():
    """Random three-qubit states of ranks 8, 3 and 1 (the SDP is restricted to supp ρ_ABC) and a product over B (a Markov
    chain, F = 1: Hayden, Jozsa, Petz & Winter 2004): certified; J, Y or Z moved by 1e-3 alone is refused (J: Tr_out J ≠ 1_B;
    Y, Z: the dual bound rises above the stated bracket; Y only where it matters, see below); and the value is at least the Petz map's fidelity, a feasible
    channel (Seshadreesan & Wilde 2015), recomputed here from the closed form."""
    rng = np.random.default_rng(23)
    reqs = []
    for rank in (8, 3, 1):
        reqs.append({"op": "fidelity-of-recovery", "rho": {"matrix": _mat(random_density(8, rng, rank)), "dims": [2, 2, 2]}, "a": [0], "b": [1], "c": [2]})
    prod = np.kron(random_density(2, rng), np.kron(np.diag([1.0, 0.0]), random_density(2, rng)))
    reqs.append({"op": "fidelity-of-recovery", "rho": {"matrix": _mat(prod), "dims": [2, 2, 2]}, "a": [0], "b": [1], "c": [2]})
    answers = cli_compute(reqs)
    for r, a in zip(reqs, answers):
        assert a["ok"], a.get("error")
        v = C.check(r, a)
        assert v["certified"], [c for c in v["checks"] if not c["ok"]]
        assert 0 <= a["value"] <= 1 and a["certificate"]["bounds"]["upper"] <= 1
        # Both objectives recomputed from the points agree with the stated ones (the checker's own numbers).
        assert float(v["lower"]) <= a["value"] <= float(v["upper"])
        # For rank 1 the bound √(Tr ρY · Tr σY⁻¹) does not depend on Y (Y is a number on supp ρ and the bound is
        # scale invariant), and at F = 1 a raised upper bound is clipped back to 1: there perturbed dual points prove as much.
        keys = [("primal", "choi"), ("dual", "Y"), ("dual", "Z")][: 3 if r is reqs[0] or r is reqs[1] else 1]
        if r is reqs[2]:
            keys.append(("dual", "Z"))
        for which, key in keys:
            b = copy.deepcopy(a)
            b["certificate"][which][key] = _perturb(b["certificate"][which][key], rng, 1e-3)
            assert not C.check(r, b)["certified"], (r["rho"]["matrix"]["re"][0][:2], which, key)
    assert abs(answers[-1]["value"] - 1) <= 1e-6
    # The Petz map R(X) = ρ_BC^{1/2}(ρ_B^{-1/2} X ρ_B^{-1/2} ⊗ 1_C)ρ_BC^{1/2} (Petz 1986) is one channel: F(A;C|B) ≥ its fidelity.
    for r, a in zip(reqs[:1], answers[:1]):
        rho = C.matrix(r["rho"]["matrix"])
        rbc = C.partial_trace(rho, [2, 2, 2], [1, 2])
        rb = C.partial_trace(rho, [2, 2, 2], [1])
        rab = C.partial_trace(rho, [2, 2, 2], [0, 1])
        wb, vb = np.linalg.eigh(rb)
        ib = (vb / np.sqrt(wb)) @ vb.conj().T
        sq = C.sqrtm_psd(rbc)
        L = np.kron(np.eye(2), sq @ np.kron(ib, np.eye(2)))
        # (id_A ⊗ R)(ρ_AB) = (1_A ⊗ ρ_BC^{1/2}(ρ_B^{-1/2} ⊗ 1)) (ρ_AB ⊗ 1_C) (…)*
        petz = L @ np.kron(rab, np.eye(2)) @ L.conj().T
        f_petz = C.root_fidelity(rho, petz) ** 2
        assert a["value"] >= f_petz - 1e-7, (a["value"], f_petz)


def test_values_at_the_end_of_their_range_are_clipped_stated_and_still_certified():
    """A diamond distance of 1 (identity against the bit flip: orthogonal outputs on |0⟩; common practice) and p_guess = 1 for
    orthogonal states (Nielsen & Chuang, Box 2.3): value and bracket within [0, 1]; an excess is stated in certificate.clipped;
    the checker, clipping its own bracket to the same range, certifies them."""
    reqs = [
        {"op": "diamond-distance", "a": {"kraus": [[[1, 0], [0, 1]]]}, "b": {"kraus": [[[0, 1], [1, 0]]]}},
        {"op": "guessing-probability", "probabilities": [0.5, 0.5], "states": [[[1, 0], [0, 0]], [[0, 0], [0, 1]]]},
    ]
    for r, a in zip(reqs, cli_compute(reqs)):
        assert a["ok"], a.get("error")
        b = a["certificate"]["bounds"]
        assert b["lower"] <= a["value"] <= b["upper"] <= 1, (r["op"], a["value"], b)
        assert abs(a["value"] - 1) <= 1e-7
        clip = a["certificate"].get("clipped")
        if clip:
            assert clip["excess"] > 0 and clip["excess"] <= 1e-6, clip
            assert max(clip["from"], clip["bracket"]["upper"]) > 1, clip
        assert C.check(r, a)["certified"], r["op"]


def test_fidelity_of_recovery_at_4_2_4_is_certified_and_matches_cvxopt_on_the_dual_sdp():
    """A Hilbert–Schmidt state on (d_A, d_B, d_C) = (4, 2, 4), the size the eliminated Schur complement is for
    (src/sdp/elimination.ts): the engine's answer is certified by this checker, its value agrees with cvxopt's
    dual SDP (committed test/reference/data/recovery-cases.json, scripts/reference/cvxopt_recovery.py) to 1e-6
    relative, and a Choi matrix moved by 1e-3 is refused (Tr_out J = 1_B fails)."""
    ref = json.loads((DATA / "recovery-cases.json").read_text())
    case = next(c for c in ref["recovery"] if c["rho"]["dims"] == [4, 2, 4])
    r = {"op": "fidelity-of-recovery", "rho": case["rho"], "a": case["a"], "b": case["b"], "c": case["c"]}
    (a,) = cli_compute([r])
    assert a["ok"], a.get("error")
    v = C.check(r, a)
    assert v["certified"], [c for c in v["checks"] if not c["ok"]]
    assert abs(a["value"] - case["value"]) <= 1e-6 * case["value"], (a["value"], case["value"])
    b = copy.deepcopy(a)
    b["certificate"]["primal"]["choi"] = _perturb(b["certificate"]["primal"]["choi"], np.random.default_rng(5), 1e-3)
    assert not C.check(r, b)["certified"]
