"""rhosigma for Python: the quantities of quantum information theory from the rhosigma engine.

    >>> import numpy as np, rhosigma
    >>> rhosigma.entropy(np.eye(4) / 4)                        # doctest: +SKIP
    2.0
    >>> rhosigma.compute({"op": "entropy", "rho": np.eye(2) / 2})["value"]   # doctest: +SKIP
    1

Everything is computed by the one TypeScript engine (`rhosigma serve`, one process per kernel); this
package converts numpy values to the plain-data protocol and back, raises refusals as `ComputeError`,
and displays states, channels and answers in notebooks (`%load_ext rhosigma`). Widgets:
`rhosigma.widgets`; certificate checks: `rhosigma.certificates`.
"""
from ._version import __version__
from .answer import Answer
from .convert import from_protocol, to_numpy, to_protocol
from .engine import Engine, compute, compute_batch, default_engine, engine_command, shutdown
from .errors import ComputeError, EngineError, EngineNotFound, EngineStartError, RhosigmaError

__all__ = [
    "__version__",
    "Answer",
    "ComputeError",
    "Engine",
    "EngineError",
    "EngineNotFound",
    "EngineStartError",
    "RhosigmaError",
    "compute",
    "compute_batch",
    "default_engine",
    "engine_command",
    "from_protocol",
    "shutdown",
    "to_numpy",
    "to_protocol",
]
