"""rhosigma for Python: the quantities of quantum information theory from the rhosigma engine.

    >>> import numpy as np, rhosigma
    >>> rhosigma.entropy(np.eye(4) / 4)                                       # doctest: +SKIP
    2.0
    >>> rhosigma.compute({"op": "entropy", "rho": np.eye(2) / 2})["value"]    # doctest: +SKIP
    1

Everything is computed by the one TypeScript engine (`rhosigma serve`, one process per kernel); this
package converts numpy values to the plain-data protocol and back, raises refusals as `ComputeError`,
and displays states, channels and answers in notebooks (`%load_ext rhosigma`). Jupyter widgets live in
`rhosigma.widgets`, the checks of SDP certificates in `rhosigma.certificates`.
"""
from ._version import __version__
from .answer import Answer
from .convert import from_protocol, to_numpy, to_protocol
from .display import ANSWER_MIME, load_ipython_extension, unload_ipython_extension
from .engine import Engine, compute, compute_async, compute_batch, default_engine, engine_command, shutdown
from .errors import ComputeError, EngineError, EngineNotFound, EngineStartError, RhosigmaError
from .functions import (
    apply_channel,
    bures_distance,
    call,
    channel_check,
    channel_convert,
    channel_preset,
    chernoff_exponent,
    complementary_channel,
    compose_channels,
    conditional_entropy,
    conditional_max_entropy,
    conditional_min_entropy,
    conditional_mutual_information,
    conditional_renyi_entropy,
    diamond_distance,
    divergence,
    entropy,
    expectation_divergence,
    fidelity,
    fidelity_of_recovery,
    fidelity_sdp,
    fisher_information,
    guessing_probability,
    guesswork,
    max_information,
    monotone_metric,
    mutual_information,
    partial_trace,
    partial_transpose,
    petz_recovery,
    purified_distance,
    reorder_subsystems,
    smooth_max_divergence,
    spectrum,
    state_preset,
    trace_distance,
    petz_map,
    data_processing,
    markov_structure,
    commuting_square,
    state_check,
    repair_state,
    verify_answer,
    success_within_guesses,
)
from .objects import Channel, State
from .sweeps import sweep

__all__ = [
    "__version__", "ANSWER_MIME", "Answer", "Channel", "ComputeError", "Engine", "EngineError", "EngineNotFound",
    "EngineStartError", "RhosigmaError", "State", "apply_channel", "bures_distance", "call", "channel_check",
    "channel_convert", "channel_preset", "chernoff_exponent", "complementary_channel", "compose_channels", "compute",
    "compute_async", "compute_batch", "conditional_entropy", "conditional_max_entropy", "conditional_min_entropy",
    "conditional_mutual_information", "conditional_renyi_entropy", "default_engine", "diamond_distance", "divergence",
    "engine_command", "entropy", "expectation_divergence", "fidelity", "fidelity_of_recovery", "fidelity_sdp",
    "fisher_information", "from_protocol", "guessing_probability", "guesswork", "load_ipython_extension",
    "max_information", "monotone_metric", "mutual_information", "partial_trace", "partial_transpose", "petz_recovery",
    "purified_distance", "reorder_subsystems", "shutdown", "smooth_max_divergence", "spectrum", "state_preset",
    "sweep", "to_numpy", "to_protocol", "trace_distance", "unload_ipython_extension",
    "petz_map", "data_processing", "markov_structure", "commuting_square", "state_check", "repair_state",
    "verify_answer", "success_within_guesses",
]


def _jupyter_labextension_paths():
    """Where JupyterLab finds the prebuilt extension (`jupyter labextension develop` links it)."""
    return [{"src": "labextension", "dest": "rhosigma"}]
