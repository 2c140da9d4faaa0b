"""Friendly functions: one per op, numpy arrays in (with dims), numpy arrays, floats and dicts out.

Each function builds the op's request (docs/protocol.md; `rhosigma ops NAME` prints its schema), sends it
through the kernel's engine and returns the headline value: a float for a quantity (float('inf') when
infinite), a numpy array for a matrix, a `State` or `Channel` where the op makes one. `details=True`
returns the whole answer instead, as a dict with numpy arrays (certificates, optimisers, conventions,
reasons). A refusal raises `ComputeError` with the protocol's code, message and path.

Arguments: states are numpy arrays (a 2-D density matrix, or a 1-D ket), `State` objects, or the
protocol's dicts; `dims=` and `labels=` describe the subsystems of an array (a `State` brings its own).
Channels are `Channel` objects or protocol dicts. Subsystems are indices from 0 or labels. Keyword names
are the protocol's in snake_case (`support_tolerance` for "supportTolerance"). Every function takes
`timeout` (seconds; it becomes the request's "deadline", see rhosigma.engine), those whose op validates
its inputs `tolerance`, and those of quantities with logarithms `base` (2 = bits by default, "e" = nats).
Ops without a function here (new ones) are reached with `call("op-name", field=value, ...)`.

Deliberately not here: any numerics. Cost: one engine request per call (rhosigma.engine).
"""
from __future__ import annotations

from typing import Any, Sequence

import numpy as np

from .convert import to_numpy
from .engine import default_engine
from .objects import Channel, State

__all__ = [
    "call", "apply_channel", "bures_distance", "channel_check", "channel_convert", "channel_preset",
    "chernoff_exponent", "complementary_channel", "compose_channels", "conditional_entropy",
    "conditional_max_entropy", "conditional_min_entropy", "conditional_mutual_information",
    "conditional_renyi_entropy", "diamond_distance", "divergence", "entropy", "expectation_divergence",
    "fidelity", "fidelity_of_recovery", "fidelity_sdp", "fisher_information", "guessing_probability",
    "guesswork", "max_information", "monotone_metric", "mutual_information", "partial_trace",
    "partial_transpose", "petz_recovery", "purified_distance", "reorder_subsystems",
    "smooth_max_divergence", "spectrum", "state_preset", "trace_distance",
    "petz_map", "data_processing", "markov_structure", "commuting_square", "state_check", "repair_state",
    "verify_answer",
]

_SPECIAL_NAMES = {"from_dims": "from", "to_dims": "to", "N": "N"}


def _field(name: str) -> str:
    if name in _SPECIAL_NAMES:
        return _SPECIAL_NAMES[name]
    head, *rest = name.split("_")
    return head + "".join(p[:1].upper() + p[1:] for p in rest)


def _state(x: Any, dims: Sequence[int] | None = None, labels: Sequence[str] | None = None) -> Any:
    """A state argument in protocol form; `dims`/`labels` attach to a bare array or list."""
    if isinstance(x, State) or isinstance(x, dict):
        if dims is not None or labels is not None:
            raise ValueError("dims= and labels= describe a bare array; a State or dict carries its own")
        return x
    if dims is None and labels is None:
        return x
    a = np.asarray(x)
    out: dict[str, Any] = {"ket": x} if a.ndim == 1 else {"matrix": x}
    if dims is not None:
        out["dims"] = list(dims)
    if labels is not None:
        out["labels"] = list(labels)
    return out


def _systems(s: Any) -> Any:
    """One subsystem (an index or a label) or several."""
    if s is None:
        return None
    if isinstance(s, (int, np.integer, str)):
        return [s]
    return list(s)


def _number(v: Any) -> Any:
    if isinstance(v, bool):
        return v
    if isinstance(v, int):
        return float(v)
    return v


def _ask(op: str, fields: dict, *, timeout: float | None = None) -> dict:
    request: dict[str, Any] = {"op": op}
    for k, v in fields.items():
        if v is not None:
            request[_field(k)] = v
    answer = default_engine().compute(request, timeout=timeout)
    answer.raise_for_error()
    return answer


def _plain_out(answer: dict, details: bool) -> Any:
    if details:
        return to_numpy(dict(answer))
    value = answer["value"]
    if isinstance(value, dict) and ("kraus" in value or "choi" in value):
        return Channel.from_protocol(value)
    return _number(to_numpy(value, "value"))


def call(op: str, *, details: bool = False, timeout: float | None = None, **fields: Any) -> Any:
    """Any op by name: `call("entropy", rho=r, alpha=2)`; snake_case fields become the protocol's names."""
    return _plain_out(_ask(op, fields, timeout=timeout), details)


# -- entropies and information ----------------------------------------------------------------------

def entropy(rho, *, alpha=None, dims=None, labels=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """Von Neumann entropy −Tr ρ log ρ, or the Rényi entropy of order `alpha` (op entropy)."""
    return _plain_out(_ask("entropy", dict(rho=_state(rho, dims, labels), alpha=alpha, support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def conditional_entropy(rho, a, b, *, dims=None, labels=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """H(A|B) = H(AB) − H(B) for subsystem groups a and b (op conditional-entropy)."""
    return _plain_out(_ask("conditional-entropy", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def mutual_information(rho, a, b, *, dims=None, labels=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """I(A:B) = H(A) + H(B) − H(AB) (op mutual-information)."""
    return _plain_out(_ask("mutual-information", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def conditional_mutual_information(rho, a, b, c, *, dims=None, labels=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """I(A;C|B) = H(AB) + H(BC) − H(B) − H(ABC); b may be empty (op conditional-mutual-information)."""
    return _plain_out(_ask("conditional-mutual-information", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b) if b is not None else [], c=_systems(c), support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def conditional_renyi_entropy(rho, a, b, *, family, alpha, optimized=None, dims=None, labels=None, max_iterations=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """Conditional Rényi entropy of A given B, "petz" or "sandwiched", optimised or not (op conditional-renyi-entropy)."""
    return _plain_out(_ask("conditional-renyi-entropy", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), family=family, alpha=alpha, optimized=optimized, max_iterations=max_iterations, support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def conditional_min_entropy(rho, a, b, *, dims=None, labels=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """H_min(A|B) by an SDP; `details=True` for the optimal σ_B and the certificate (op conditional-min-entropy)."""
    return _plain_out(_ask("conditional-min-entropy", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def conditional_max_entropy(rho, a, b, *, dims=None, labels=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """H_max(A|B) by an SDP; `details=True` for the optimal σ_B and the certificate (op conditional-max-entropy)."""
    return _plain_out(_ask("conditional-max-entropy", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def max_information(rho, a, b, *, dims=None, labels=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """I_max(A:B) by an SDP (op max-information)."""
    return _plain_out(_ask("max-information", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


# -- divergences and distances ----------------------------------------------------------------------

def divergence(rho, sigma, family="umegaki", *, alpha=None, z=None, epsilon=None, dims=None, max_iterations=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """D(ρ‖σ) of a family: umegaki, petz, sandwiched, alpha-z, geometric, max, min, measured (op divergence)."""
    return _plain_out(_ask("divergence", dict(family=family, rho=_state(rho, dims), sigma=_state(sigma, dims), alpha=alpha, z=z, epsilon=epsilon, max_iterations=max_iterations, support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def smooth_max_divergence(rho, sigma, epsilon, *, dims=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """D_max^ε(ρ‖σ) by an SDP (op smooth-max-divergence)."""
    return _plain_out(_ask("smooth-max-divergence", dict(rho=_state(rho, dims), sigma=_state(sigma, dims), epsilon=epsilon, support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def expectation_divergence(rho, *, channel=None, blocks=None, multiplicities=None, dims=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """D(ρ‖E(ρ)) for a conditional expectation E given as a channel or as blocks (op expectation-divergence)."""
    return _plain_out(_ask("expectation-divergence", dict(rho=_state(rho, dims), channel=channel, blocks=blocks, multiplicities=multiplicities, support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def fidelity(rho, sigma, *, dims=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """Uhlmann fidelity F = ‖√ρ√σ‖₁² (squared; `details=True` for the root) (op fidelity)."""
    return _plain_out(_ask("fidelity", dict(rho=_state(rho, dims), sigma=_state(sigma, dims), support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


def fidelity_sdp(rho, sigma, *, dims=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """Fidelity (squared) by Watrous's SDP, with its certificate under `details=True` (op fidelity-sdp)."""
    return _plain_out(_ask("fidelity-sdp", dict(rho=_state(rho, dims), sigma=_state(sigma, dims), support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


def trace_distance(rho, sigma, *, dims=None, tolerance=None, details=False, timeout=None):
    """½‖ρ − σ‖₁ (op trace-distance)."""
    return _plain_out(_ask("trace-distance", dict(rho=_state(rho, dims), sigma=_state(sigma, dims), tolerance=tolerance), timeout=timeout), details)


def bures_distance(rho, sigma, *, dims=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """√(2(1 − √F)) (op bures-distance)."""
    return _plain_out(_ask("bures-distance", dict(rho=_state(rho, dims), sigma=_state(sigma, dims), support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


def purified_distance(rho, sigma, *, dims=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """√(1 − F̄) with the generalized fidelity; subnormalised states allowed (op purified-distance)."""
    return _plain_out(_ask("purified-distance", dict(rho=_state(rho, dims), sigma=_state(sigma, dims), support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


def chernoff_exponent(rho, sigma, *, dims=None, support_tolerance=None, tolerance=None, base=None, details=False, timeout=None):
    """Quantum Chernoff exponent; float('inf') for orthogonal supports (op chernoff-exponent)."""
    return _plain_out(_ask("chernoff-exponent", dict(rho=_state(rho, dims), sigma=_state(sigma, dims), support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def monotone_metric(rho, x, y=None, *, metric=None, restrict_to_support=None, dims=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """Monotone metric γ_ρ^f(X, Y) for Hermitian tangent vectors (op monotone-metric)."""
    return _plain_out(_ask("monotone-metric", dict(rho=_state(rho, dims), x=x, y=y, metric=metric, restrict_to_support=restrict_to_support, support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


def fisher_information(rho, derivative, *, metric=None, sld=None, dims=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """Quantum Fisher information of a one-parameter family at ρ with derivative ∂ρ (op fisher-information)."""
    return _plain_out(_ask("fisher-information", dict(rho=_state(rho, dims), derivative=derivative, metric=metric, sld=sld, support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


# -- recoverability ---------------------------------------------------------------------------------

def petz_recovery(rho, a, b, c, *, t=None, dims=None, labels=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """Fidelity (squared) of the Petz-recovered state; `details=True` for the state and the map (op petz-recovery)."""
    return _plain_out(_ask("petz-recovery", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), c=_systems(c), t=t, support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


def fidelity_of_recovery(rho, a, b, c, *, dims=None, labels=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """F(A;C|B) by an SDP, with the optimal channel and certificate under `details=True` (op fidelity-of-recovery)."""
    return _plain_out(_ask("fidelity-of-recovery", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), c=_systems(c), support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)

def petz_map(sigma, channel, *, t=None, averaged=None, quadrature_tolerance=None, dims=None, support_tolerance=None, tolerance=None, details=False, timeout=None):
    """The Petz recovery map of (σ, N) as a `Channel`: rotated by `t`, or averaged over t (averaged=True);
    `details=True` for the Choi matrix, the completion outside supp N(σ) and the quadrature's error bound (op petz-map)."""
    return _plain_out(_ask("petz-map", dict(sigma=_state(sigma, dims), channel=channel, t=t, averaged=averaged, quadrature_tolerance=quadrature_tolerance, support_tolerance=support_tolerance, tolerance=tolerance), timeout=timeout), details)


def data_processing(rho, sigma, channel, family="umegaki", *, alpha=None, z=None, epsilon=None, dims=None, max_iterations=None, gap_tolerance=None, recovery_tolerance=None, support_tolerance=None, tolerance=None, base=None, details=True, timeout=None):
    """Data processing for (ρ, σ, N): both sides, the gap, the Petz-recovered state and a verdict with its
    evidence; the whole answer by default (details=False gives the gap alone) (op data-processing).
    A gap near zero is numerical evidence of saturation, not a proof."""
    return _plain_out(_ask("data-processing", dict(family=family, rho=_state(rho, dims), sigma=_state(sigma, dims), channel=channel, alpha=alpha, z=z, epsilon=epsilon, max_iterations=max_iterations, gap_tolerance=gap_tolerance, recovery_tolerance=recovery_tolerance, support_tolerance=support_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


def markov_structure(rho, a, b, c, *, dims=None, labels=None, support_tolerance=None, algebra_tolerance=None, markov_tolerance=None, seed=None, tolerance=None, base=None, details=True, timeout=None):
    """The block structure of a quantum Markov chain A–B–C (weights, factor dimensions, the unitary on B,
    the rebuild error), or for a state that is not one an upper bound on its distance to that form (op markov-structure)."""
    return _plain_out(_ask("markov-structure", dict(rho=_state(rho, dims, labels), a=_systems(a), b=_systems(b), c=_systems(c), support_tolerance=support_tolerance, algebra_tolerance=algebra_tolerance, markov_tolerance=markov_tolerance, seed=seed, tolerance=tolerance, base=base), timeout=timeout), details)


def commuting_square(first, second, *, states=None, steps=None, commuting_tolerance=None, tolerance=None, base=None, details=True, timeout=None):
    """Whether two conditional expectations (channels) form a commuting square, the expectation onto their
    intersection, the Friedrichs cosine and, for given states, the quasi-factorization ratio (op commuting-square)."""
    return _plain_out(_ask("commuting-square", dict(first=first, second=second, states=[_state(x) for x in states] if states is not None else None, steps=steps, commuting_tolerance=commuting_tolerance, tolerance=tolerance, base=base), timeout=timeout), details)


# -- guessing ---------------------------------------------------------------------------------------

def guessing_probability(probabilities, states, *, tolerance=None, details=False, timeout=None):
    """Optimal probability of guessing x from ρ_x drawn with p_x (an SDP) (op guessing-probability)."""
    return _plain_out(_ask("guessing-probability", dict(probabilities=probabilities, states=[_state(s) for s in states], tolerance=tolerance), timeout=timeout), details)


def guesswork(probabilities, states=None, *, moment=None, weight_tolerance=None, tolerance=None, details=False, timeout=None):
    """Least expected number of guesses (to the `moment`), with quantum side information when `states` are given (op guesswork)."""
    return _plain_out(_ask("guesswork", dict(probabilities=probabilities, states=[_state(s) for s in states] if states is not None else None, moment=moment, weight_tolerance=weight_tolerance, tolerance=tolerance), timeout=timeout), details)


# -- matrices, states and channels ------------------------------------------------------------------

def spectrum(matrix, *, vectors=False, tolerance=None, details=False, timeout=None):
    """Eigenvalues in ascending order; with `vectors=True` the pair (values, unitary of eigenvectors as columns) (op spectrum)."""
    answer = _ask("spectrum", dict(matrix=matrix, vectors=True if vectors else None, tolerance=tolerance), timeout=timeout)
    if details:
        return to_numpy(dict(answer))
    values = to_numpy(answer["value"], "value")
    return (values, to_numpy(answer["vectors"])) if vectors else values


def partial_trace(matrix, dims, *, over=None, keep=None, labels=None, details=False, timeout=None):
    """Tr over some subsystems (`over`), or onto those kept (`keep`, in that order) (op partial-trace)."""
    return _plain_out(_ask("partial-trace", dict(matrix=matrix, dims=list(dims), labels=labels, over=_systems(over), keep=_systems(keep)), timeout=timeout), details)


def partial_transpose(matrix, dims, on, *, labels=None, details=False, timeout=None):
    """Partial transpose on the listed subsystems (computational basis) (op partial-transpose)."""
    return _plain_out(_ask("partial-transpose", dict(matrix=matrix, dims=list(dims), labels=labels, on=_systems(on)), timeout=timeout), details)


def reorder_subsystems(matrix, dims, order, *, labels=None, details=False, timeout=None):
    """Reorder tensor factors: subsystem k of the result is subsystem order[k] of the input (op reorder-subsystems)."""
    return _plain_out(_ask("reorder-subsystems", dict(matrix=matrix, dims=list(dims), labels=labels, order=list(order)), timeout=timeout), details)


def state_preset(name, *, tolerance=None, details=False, timeout=None, **params):
    """A named state as a `State` (op state-preset): maximally-mixed, maximally-entangled, werner, isotropic, ghz, w, thermal, bloch, ket."""
    answer = _ask("state-preset", dict(name=name, tolerance=tolerance, **params), timeout=timeout)
    return to_numpy(dict(answer)) if details else State.from_protocol(answer["state"])


def apply_channel(channel, rho, on=None, *, dims=None, labels=None, tolerance=None, details=False, timeout=None):
    """The output state (N_on ⊗ id)(ρ) as a `State` (op apply-channel)."""
    answer = _ask("apply-channel", dict(channel=channel, rho=_state(rho, dims, labels), on=_systems(on), tolerance=tolerance), timeout=timeout)
    return to_numpy(dict(answer)) if details else State.from_protocol(answer["state"])


def channel_preset(name, *, tolerance=None, details=False, timeout=None, **params):
    """A named channel as a `Channel` (op channel-preset): depolarizing, dephasing, amplitude-damping, erasure, ..."""
    return _plain_out(_ask("channel-preset", dict(name=name, tolerance=tolerance, **params), timeout=timeout), details)


def channel_check(channel, *, tolerance=None, timeout=None):
    """Complete positivity, trace preservation and unitality with the size of each violation, as a dict (op channel-check)."""
    answer = to_numpy(dict(_ask("channel-check", dict(channel=channel, tolerance=tolerance), timeout=timeout)))
    return {k: _number(v) for k, v in answer.items() if k not in ("ok", "op")}


def channel_convert(channel, form, *, minimal=None, tolerance=None, details=False, timeout=None):
    """The channel as "kraus" or "choi" (a `Channel`), or "stinespring" (the isometry V, a numpy array) (op channel-convert)."""
    answer = _ask("channel-convert", dict(channel=channel, form=form, minimal=minimal, tolerance=tolerance), timeout=timeout)
    if details:
        return to_numpy(dict(answer))
    value = to_numpy(answer["value"], "value")
    if form == "choi":
        return Channel(choi=value, from_dims=answer["from"], to_dims=answer["to"])
    if form == "kraus":
        return Channel(kraus=value, from_dims=answer["from"], to_dims=answer["to"])
    return value


def complementary_channel(channel, *, minimal=None, tolerance=None, details=False, timeout=None):
    """The complementary channel N^c as a `Channel` (op complementary-channel)."""
    return _plain_out(_ask("complementary-channel", dict(channel=channel, minimal=minimal, tolerance=tolerance), timeout=timeout), details)


def compose_channels(*channels, tolerance=None, details=False, timeout=None):
    """The composition, applied in the order listed (the first acts first), as a `Channel` (op compose-channels)."""
    return _plain_out(_ask("compose-channels", dict(channels=list(channels), tolerance=tolerance), timeout=timeout), details)


def diamond_distance(a, b, *, tolerance=None, details=False, timeout=None):
    """½‖N − M‖_⋄ by Watrous's SDP; `details=True` for the optimal input and the certificate (op diamond-distance)."""
    return _plain_out(_ask("diamond-distance", dict(a=a, b=b, tolerance=tolerance), timeout=timeout), details)


def state_check(state, *, dims=None, labels=None, tolerance=None, timeout=None):
    """Hermiticity (with the worst entry), the spectrum, positivity and the trace of a state, as the engine
    reports them; never raises for a bad state (op state-check)."""
    return to_numpy(dict(_ask("state-check", dict(state=_state(state, dims, labels), tolerance=tolerance), timeout=timeout)))


def repair_state(state, actions, *, dims=None, labels=None, tolerance=None, details=False, timeout=None):
    """The state after the chosen repairs only ("hermitian", "clip", "normalize", ... as the op lists them),
    in order; `details=True` says what each one changed (op repair-state)."""
    answer = _ask("repair-state", dict(state=_state(state, dims, labels), actions=list(actions), tolerance=tolerance), timeout=timeout)
    return to_numpy(dict(answer)) if details else _plain_out(answer, False)


def verify_answer(request, answer, *, timeout=None):
    """The engine's own re-check of an SDP answer's certificate from its points (op verify-answer); the
    independent check is rhosigma.certificates.check, which uses numpy alone."""
    return to_numpy(dict(_ask("verify-answer", dict(request=request, answer=answer), timeout=timeout)))


def _checks_of_state(state: State, tolerance: float | None) -> dict:
    """State.checks(): the spectrum and the three validity checks as the engine reports them."""
    tol = 1e-9 if tolerance is None else tolerance
    answers = default_engine().compute_batch([
        {"op": "spectrum", "matrix": state.matrix},
        {"op": "entropy", "rho": state, "tolerance": tol},
    ])
    spec, valid = answers
    if not spec.ok:  # not Hermitian: no spectrum to show, only the engine's reason
        return {"valid": False, "tolerance": tol, "problem": {k: spec["error"].get(k) for k in ("code", "message", "path")}}
    values = to_numpy(spec["value"], "value")
    out: dict[str, Any] = {
        "spectrum": values,
        "hermiticity_defect": float(spec["hermiticityDefect"]),
        "min_eigenvalue": float(values[0]),
        "trace": float(np.sum(values)),
        "valid": valid.ok,
        "tolerance": tol,
    }
    if not valid.ok:
        out["problem"] = {k: valid["error"].get(k) for k in ("code", "message", "path")}
    return out
