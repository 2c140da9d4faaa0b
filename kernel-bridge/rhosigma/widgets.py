"""Jupyter widgets: state and channel editors and calculators, one class per TypeScript model.

    >>> import numpy as np
    >>> from rhosigma.widgets import StateEditor, DivergenceCalculator
    >>> rho = StateEditor(np.diag([0.7, 0.3]))                     # doctest: +SKIP
    >>> sigma = StateEditor(np.eye(2) / 2)                         # doctest: +SKIP
    >>> calc = DivergenceCalculator(rho, sigma, family="petz", alpha=0.5)   # doctest: +SKIP
    >>> calc                                                       # the widget, in JupyterLab
    >>> calc.value, calc.result                                    # the number and the whole answer

Each class mirrors one model of src/widgets (docs/surfaces.md, "Jupyter widgets"): the traits are the
model's `defaults()` fields (src/widgets/schema.ts), synced both ways. Editors hold a state or channel in
the protocol's form (numpy arrays go in with `dims`; large matrices travel packed); calculators hold
editors by widget reference (`rho`, `sigma`, `states`), so an edit in the browser recomputes every
calculator that uses the editor. The browser computes in its web worker and sets `result` (the protocol
answer, plain data) and `request` the moment the answer arrives; `observe(cb, "result")` and
`await calc.next_result()` see it. With no front end attached (nbclient, a script) a calculator computes
through the headless engine (rhosigma.engine) instead, from the same request
(`computed_by` says which: "browser" or "kernel").

Numerical answers are evidence, not proofs: read `result["certificate"]` of an SDP and the tolerances
before resting anything on a near-zero.

Deliberately not here: any numerics (the engine's), the request rules' TypeScript twin
(src/widgets/requests.ts, kept the same). Cost: a comm per widget; a headless compute is one request.
"""
from __future__ import annotations

import asyncio
import base64
import binascii
import json
from typing import Any, Sequence

import numpy as np
import traitlets as t
from ipywidgets import DOMWidget, Widget, widget_serialization

from ._frontend import MODULE_NAME, MODULE_VERSION
from .answer import Answer
from .convert import from_protocol, to_numpy, to_protocol
from .engine import compute as engine_compute
from .objects import Channel, State
from .sweeps import DEFAULT_CHUNK, _ask, _engine, _read_spec, rows_to_frame, sweep_rows

__all__ = [
    "StateEditor",
    "ChannelEditor",
    "DivergenceCalculator",
    "RecoverabilityCalculator",
    "GuessingCalculator",
    "OneShotCalculator",
    "Sweep",
]

_ALPHA_FAMILIES = {"petz", "sandwiched", "alpha-z", "geometric"}


# Packed matrices over the comm as binary buffers (the twin of src/widgets/buffers.ts): the base64 text
# of a {"packed": "float64-le"} object's `re`/`im` goes out as bytes (ipywidgets sends bytes and
# memoryviews nested in a trait's JSON as binary buffers of the message), and bytes that come in become
# base64 text again, so the traits always hold the protocol's plain-data form.
def _map_packed(value: Any, part: Any) -> Any:
    if isinstance(value, list):
        return [_map_packed(v, part) for v in value]
    if isinstance(value, dict):
        out = {k: _map_packed(v, part) for k, v in value.items()}
        if value.get("packed") == "float64-le":
            for key in ("re", "im"):
                if key in value:
                    out[key] = part(value[key])
        return out
    return value


def _text_to_bytes(x: Any) -> Any:
    if not isinstance(x, str):
        return x
    try:
        return memoryview(base64.b64decode(x.replace("-", "+").replace("_", "/"), validate=True))
    except (binascii.Error, ValueError):
        return x  # not base64: left as text, for the engine to refuse with its own message


def _bytes_to_text(x: Any) -> Any:
    if isinstance(x, (bytes, bytearray, memoryview)):
        return base64.b64encode(bytes(x)).decode("ascii")
    return x


def _packed_to_buffers(value: Any, _widget: Any = None) -> Any:
    return _map_packed(value, _text_to_bytes)


def _packed_from_buffers(value: Any, _widget: Any = None) -> Any:
    return _map_packed(value, _bytes_to_text)


_PACKED = {"to_json": _packed_to_buffers, "from_json": _packed_from_buffers}


class _Base(DOMWidget):
    _model_module = t.Unicode(MODULE_NAME).tag(sync=True)
    _model_module_version = t.Unicode(MODULE_VERSION).tag(sync=True)
    _view_module = t.Unicode(MODULE_NAME).tag(sync=True)
    _view_module_version = t.Unicode(MODULE_VERSION).tag(sync=True)


class StateEditor(_Base):
    """An editor of a quantum state: a density matrix (or a ket) with subsystem `dims` and `labels`.

    `StateEditor(np.diag([0.5, 0.5, 0, 0]), dims=[2, 2], labels=["A", "B"])`, `StateEditor(ket=psi)`,
    or `StateEditor(rhosigma.State(...))`. In JupyterLab it shows the grid (numbers or expressions),
    presets, paste and the engine's live checks; `valid`, `check` and `error` are the front end's verdict.
    `.state` is the current `rhosigma.State`, `.value` its numpy matrix.
    """

    _model_name = t.Unicode("StateEditorModel").tag(sync=True)
    _view_name = t.Unicode("StateEditorView").tag(sync=True)
    matrix = t.Any([[0.5, 0], [0, 0.5]], allow_none=True).tag(sync=True, **_PACKED)
    ket = t.Any(None, allow_none=True).tag(sync=True, **_PACKED)
    dims = t.List(t.Int(), [2]).tag(sync=True)
    labels = t.List(t.Unicode(), default_value=None, allow_none=True).tag(sync=True)
    preset = t.Dict(default_value=None, allow_none=True).tag(sync=True)
    title = t.Unicode("").tag(sync=True)
    valid = t.Bool(True).tag(sync=True)
    check = t.Dict(default_value=None, allow_none=True).tag(sync=True)
    error = t.Dict(default_value=None, allow_none=True).tag(sync=True)

    def __init__(self, matrix: Any = None, *, ket: Any = None, dims: Sequence[int] | None = None, labels: Sequence[str] | None = None, **kwargs: Any):
        if isinstance(matrix, State):
            s = matrix
        elif matrix is not None or ket is not None:
            s = State(matrix, ket=ket, dims=dims, labels=labels) if ket is None else State(ket=ket, dims=dims, labels=labels)
        else:
            s = None
        if s is not None:
            data = to_protocol(s.to_protocol())
            kwargs.setdefault("matrix", data.get("matrix"))
            kwargs.setdefault("ket", data.get("ket"))
            kwargs.setdefault("dims", list(data.get("dims", [s.size])))
            if data.get("labels"):
                kwargs.setdefault("labels", list(data["labels"]))
        super().__init__(**kwargs)

    def replace_state(self, matrix: Any = None, *, ket: Any = None, dims: Sequence[int] | None = None, labels: Sequence[str] | None = None) -> None:
        """Replace the state (numpy in, with dims); every calculator using this editor recomputes."""
        s = matrix if isinstance(matrix, State) else (State(ket=ket, dims=dims, labels=labels) if ket is not None else State(matrix, dims=dims, labels=labels))
        data = to_protocol(s.to_protocol())
        with self.hold_sync():
            self.matrix = data.get("matrix")
            self.ket = data.get("ket")
            self.dims = list(data.get("dims", [s.size]))
            self.labels = list(data["labels"]) if data.get("labels") else None

    def protocol_state(self) -> dict:
        """The state in the protocol's form (what a calculator puts into its request)."""
        out: dict[str, Any] = {"ket": self.ket} if self.ket is not None else {"matrix": self.matrix}
        out["dims"] = list(self.dims)
        if self.labels:
            out["labels"] = list(self.labels)
        return out

    @property
    def state(self) -> State:
        """The current state as a `rhosigma.State` (expression entries read by the engine)."""
        data = self.protocol_state()
        key = "ket" if "ket" in data else "matrix"
        a = to_numpy(data[key])
        if not isinstance(a, np.ndarray) or a.dtype == object:
            raise ValueError("the editor holds expression entries; calculators send them to the engine as they are (see .protocol_state())")
        return State(ket=a, dims=self.dims, labels=self.labels) if key == "ket" else State(a, dims=self.dims, labels=self.labels)

    @property
    def value(self) -> np.ndarray:
        """The density matrix as a numpy array."""
        return self.state.matrix

    def __repr__(self) -> str:
        n = int(np.prod(self.dims)) if self.dims else 0
        form = "ket" if self.ket is not None else "matrix"
        labels = f", labels={list(self.labels)}" if self.labels else ""
        return f"StateEditor({form} {n}×{n if form == 'matrix' else 1}, dims={list(self.dims)}{labels}, valid={self.valid})"


class ChannelEditor(_Base):
    """An editor of a channel: Kraus operators or a Choi matrix, with `input_dims` and `output_dims`.

    `ChannelEditor([K0, K1])`, `ChannelEditor(choi=J, input_dims=[2])` or
    `ChannelEditor(rhosigma.Channel.preset("depolarizing", d=2, p=0.1))`. `check` is the front end's
    channel-check answer (complete positivity, trace preservation, unitality with their violations).
    """

    _model_name = t.Unicode("ChannelEditorModel").tag(sync=True)
    _view_name = t.Unicode("ChannelEditorView").tag(sync=True)
    kraus = t.Any([[[1, 0], [0, 1]]], allow_none=True).tag(sync=True, **_PACKED)
    choi = t.Any(None, allow_none=True).tag(sync=True, **_PACKED)
    preset = t.Dict(default_value=None, allow_none=True).tag(sync=True)
    input_dims = t.List(t.Int(), [2]).tag(sync=True)
    output_dims = t.List(t.Int(), [2]).tag(sync=True)
    title = t.Unicode("").tag(sync=True)
    valid = t.Bool(True).tag(sync=True)
    check = t.Dict(default_value=None, allow_none=True).tag(sync=True)
    error = t.Dict(default_value=None, allow_none=True).tag(sync=True)

    def __init__(self, kraus: Any = None, *, choi: Any = None, input_dims: Sequence[int] | None = None, output_dims: Sequence[int] | None = None, **kwargs: Any):
        ch = kraus if isinstance(kraus, Channel) else (Channel(kraus, choi=choi, from_dims=input_dims, to_dims=output_dims) if (kraus is not None or choi is not None) else None)
        if ch is not None:
            data = to_protocol(ch.to_protocol())
            kwargs.setdefault("kraus", data.get("kraus"))
            kwargs.setdefault("choi", data.get("choi"))
            kwargs.setdefault("input_dims", list(data["from"]))
            kwargs.setdefault("output_dims", list(data["to"]))
        super().__init__(**kwargs)

    def protocol_channel(self) -> dict:
        """The channel in the protocol's form."""
        if self.choi is not None:
            return {"choi": self.choi, "from": list(self.input_dims), "to": list(self.output_dims)}
        return {"kraus": self.kraus, "from": list(self.input_dims), "to": list(self.output_dims)}

    @property
    def channel(self) -> Channel:
        """The current channel as a `rhosigma.Channel`."""
        return Channel.from_protocol(self.protocol_channel())

    def __repr__(self) -> str:
        form = f"{len(self.kraus)} Kraus operator(s)" if self.choi is None and self.kraus is not None else "Choi matrix"
        return f"ChannelEditor({form}, from {list(self.input_dims)} to {list(self.output_dims)}, valid={self.valid})"


_EDITOR_TRAITS = ["matrix", "ket", "dims", "labels", "kraus", "choi", "input_dims", "output_dims"]
_OUTPUT_TRAITS = {"request", "result", "status", "error", "computed_by"}


class _FrontendAware:
    """What calculators and sweeps share: they learn that a front end made their model (its "attached"
    message), so that they leave the computing to the browser."""

    _attached = False

    @property
    def frontend_attached(self) -> bool:
        """True once a front end (JupyterLab's widget manager) has made this widget's model."""
        return self._attached

    def _on_custom(self, _widget: Any, content: Any, _buffers: Any) -> None:
        if isinstance(content, dict) and content.get("event") == "attached":
            self._attached = True


class _Calculator(_FrontendAware, _Base):
    """What every calculator shares: `request`, `result`, `status`, `error`, `auto`, `computed_by`."""

    request = t.Dict(default_value=None, allow_none=True).tag(sync=True, **_PACKED)
    result = t.Dict(default_value=None, allow_none=True).tag(sync=True, **_PACKED)
    status = t.Unicode("idle").tag(sync=True)
    error = t.Dict(default_value=None, allow_none=True).tag(sync=True)
    auto = t.Bool(True).tag(sync=True)
    computed_by = t.Unicode(None, allow_none=True).tag(sync=True)

    _references: tuple[str, ...] = ()

    def __init__(self, **kwargs: Any):
        self._attached = False
        self._watched: list[Any] = []
        self._waiters: list[asyncio.Future] = []
        super().__init__(**kwargs)
        self.on_msg(self._on_custom)
        self.observe(self._own_change)
        self.observe(self._wake, "result")
        self._rewire()
        self._inputs_changed()

    def _own_change(self, change: dict) -> None:
        name = change["name"]
        if name in _OUTPUT_TRAITS or name.startswith("_") or name not in self.keys or name in ("layout", "tabbable", "tooltip"):
            return
        if change["name"] in self._references:
            self._rewire()
        self._inputs_changed()

    def _rewire(self) -> None:
        for w in self._watched:
            w.unobserve(self._editor_change, names=[n for n in _EDITOR_TRAITS if w.has_trait(n)])
        self._watched = []
        for name in self._references:
            v = getattr(self, name)
            for w in (v if isinstance(v, (list, tuple)) else [v]):
                if isinstance(w, (StateEditor, ChannelEditor)):
                    w.observe(self._editor_change, names=[n for n in _EDITOR_TRAITS if w.has_trait(n)])
                    self._watched.append(w)

    def _editor_change(self, _change: dict) -> None:
        self._inputs_changed()

    def _inputs_changed(self) -> None:
        # With a front end attached, the browser computes (and sets result); without one, the kernel does.
        if self.auto and not self._attached:
            self.compute()

    # -- computing ------------------------------------------------------------------------------
    def _request(self) -> dict | None:  # pragma: no cover - every subclass defines it
        raise NotImplementedError

    def compute(self) -> dict | None:
        """Compute now: in the browser when a front end is attached (the answer arrives as `result`),
        else through the headless engine, setting `result` before returning it."""
        if self._attached:
            self.send({"event": "compute"})
            return self.result
        request = self._request()
        if request is None:
            self.status = "idle"
            return None
        answer = engine_compute(request)
        data = answer.to_protocol_data() if isinstance(answer, Answer) else dict(answer)
        with self.hold_sync():
            self.request = to_protocol(request)
            self.status = "done" if data.get("ok") else "error"
            self.error = None if data.get("ok") else data.get("error")
            self.computed_by = "kernel"
            self.result = data
        return data

    def next_result(self) -> "asyncio.Future[dict]":
        """An awaitable of the next `result` (from the browser or the engine). It does not block the
        kernel: the comm message that carries the answer is handled while it waits, e.g.
        `fut = calc.next_result()` in one cell and `await fut` in a later one, or `await` it from a task."""
        loop = asyncio.get_event_loop()
        fut: asyncio.Future = loop.create_future()
        self._waiters.append(fut)
        return fut

    def _wake(self, change: dict) -> None:
        waiters, self._waiters = self._waiters, []
        for fut in waiters:
            if not fut.done():
                fut.get_loop().call_soon_threadsafe(fut.set_result, change["new"])

    @property
    def answer(self) -> Answer | None:
        """`result` as an `Answer` (numbers as floats, "Infinity" as float('inf'), matrices as numpy)."""
        if self.result is None:
            return None
        return Answer.from_protocol(dict(self.result), self.request)

    @property
    def value(self) -> Any:
        """The headline value (a float; float('inf') when infinite). Raises `ComputeError` for a refusal."""
        a = self.answer
        if a is None:
            return None
        a.raise_for_error()
        v = a.get("value")
        return float(v) if isinstance(v, (int, float)) and not isinstance(v, bool) else v

    def __repr__(self) -> str:
        r = self.result
        if r is None:
            shown = self.status
        elif r.get("ok"):
            shown = f"value={from_protocol(r.get('value'))!r}"
            cert = r.get("certificate")
            if isinstance(cert, dict):
                shown += f", certificate {cert.get('status')}"
        else:
            e = r.get("error") or {}
            shown = f"refused {e.get('code')}: {e.get('message')}"
        params = ", ".join(f"{k}={getattr(self, k)!r}" for k in self._params())
        return f"{type(self).__name__}({params}; {shown}; by {self.computed_by or '—'})"

    def _params(self) -> list[str]:
        return []


def _state(editor: Any) -> dict | None:
    return editor.protocol_state() if isinstance(editor, StateEditor) else None


class DivergenceCalculator(_Calculator):
    """D(ρ‖σ) of a family (umegaki, petz, sandwiched, alpha-z, geometric, max, min, measured) between two
    state editors. `DivergenceCalculator(rho_editor, sigma_editor, family="sandwiched", alpha=2)`."""

    _model_name = t.Unicode("DivergenceCalculatorModel").tag(sync=True)
    _view_name = t.Unicode("DivergenceCalculatorView").tag(sync=True)
    rho = t.Instance(StateEditor, allow_none=True).tag(sync=True, **widget_serialization)
    sigma = t.Instance(StateEditor, allow_none=True).tag(sync=True, **widget_serialization)
    family = t.Unicode("umegaki").tag(sync=True)
    alpha = t.Float(0.5).tag(sync=True)
    z = t.Float(1.0).tag(sync=True)
    base = t.Union([t.Float(), t.Unicode()], default_value=2).tag(sync=True)
    _references = ("rho", "sigma")

    def __init__(self, rho: StateEditor | None = None, sigma: StateEditor | None = None, **kwargs: Any):
        super().__init__(rho=rho, sigma=sigma, **kwargs)

    def _params(self) -> list[str]:
        return ["family"] + (["alpha"] if self.family in _ALPHA_FAMILIES else []) + (["z"] if self.family == "alpha-z" else [])

    def _request(self) -> dict | None:
        rho, sigma = _state(self.rho), _state(self.sigma)
        if rho is None or sigma is None:
            return None
        r: dict[str, Any] = {"op": "divergence", "family": self.family, "rho": rho, "sigma": sigma, "base": self.base}
        if self.family in _ALPHA_FAMILIES:
            r["alpha"] = self.alpha
        if self.family == "alpha-z":
            r["z"] = self.z
        return r


class RecoverabilityCalculator(_Calculator):
    """How well A–B–C is recovered from AB: `quantity` "conditional-mutual-information" (I(A;C|B)),
    "petz-recovery" (the Petz map's fidelity) or "fidelity-of-recovery" (an SDP with its certificate), for
    the subsystem groups `a`, `b`, `c` of a tripartite state editor `rho`."""

    _model_name = t.Unicode("RecoverabilityCalculatorModel").tag(sync=True)
    _view_name = t.Unicode("RecoverabilityCalculatorView").tag(sync=True)
    rho = t.Instance(StateEditor, allow_none=True).tag(sync=True, **widget_serialization)
    quantity = t.Unicode("conditional-mutual-information").tag(sync=True)
    a = t.List(t.Union([t.Int(), t.Unicode()]), [0]).tag(sync=True)
    b = t.List(t.Union([t.Int(), t.Unicode()]), [1]).tag(sync=True)
    c = t.List(t.Union([t.Int(), t.Unicode()]), [2]).tag(sync=True)
    base = t.Union([t.Float(), t.Unicode()], default_value=2).tag(sync=True)
    _references = ("rho",)

    def __init__(self, rho: StateEditor | None = None, **kwargs: Any):
        super().__init__(rho=rho, **kwargs)

    def _params(self) -> list[str]:
        return ["quantity", "a", "b", "c"]

    def _request(self) -> dict | None:
        rho = _state(self.rho)
        if rho is None:
            return None
        r: dict[str, Any] = {"op": self.quantity, "rho": rho, "a": list(self.a), "b": list(self.b), "c": list(self.c)}
        if self.quantity == "conditional-mutual-information":
            r["base"] = self.base
        return r


class GuessingCalculator(_Calculator):
    """Guessing probability (an SDP with the optimal POVM and its certificate) or guesswork of an
    ensemble: prior `probabilities` and a list of state editors `states`."""

    _model_name = t.Unicode("GuessingCalculatorModel").tag(sync=True)
    _view_name = t.Unicode("GuessingCalculatorView").tag(sync=True)
    states = t.List(t.Instance(StateEditor), []).tag(sync=True, **widget_serialization)
    probabilities = t.List(t.Float(), []).tag(sync=True)
    quantity = t.Unicode("guessing-probability").tag(sync=True)
    moment = t.Float(1.0).tag(sync=True)
    _references = ("states",)

    def __init__(self, states: Sequence[StateEditor] = (), probabilities: Sequence[float] | None = None, **kwargs: Any):
        states = list(states)
        if probabilities is None:
            probabilities = [1 / len(states)] * len(states) if states else []
        super().__init__(states=states, probabilities=[float(p) for p in probabilities], **kwargs)

    def _params(self) -> list[str]:
        return ["quantity", "probabilities"]

    def _request(self) -> dict | None:
        if not self.states:
            return None
        r: dict[str, Any] = {"op": self.quantity, "probabilities": list(self.probabilities), "states": [s.protocol_state() for s in self.states]}
        if self.quantity == "guesswork":
            r["moment"] = self.moment
        return r


class OneShotCalculator(_Calculator):
    """One-shot SDP quantities with their certificates: "hypothesis-testing" and "smooth-max-divergence"
    of `rho` against `sigma` at `epsilon`; "conditional-min-entropy", "conditional-max-entropy" and
    "max-information" of `rho` for the groups `a`, `b`."""

    _model_name = t.Unicode("OneShotCalculatorModel").tag(sync=True)
    _view_name = t.Unicode("OneShotCalculatorView").tag(sync=True)
    rho = t.Instance(StateEditor, allow_none=True).tag(sync=True, **widget_serialization)
    sigma = t.Instance(StateEditor, allow_none=True).tag(sync=True, **widget_serialization)
    quantity = t.Unicode("hypothesis-testing").tag(sync=True)
    epsilon = t.Float(0.01).tag(sync=True)
    a = t.List(t.Union([t.Int(), t.Unicode()]), [0]).tag(sync=True)
    b = t.List(t.Union([t.Int(), t.Unicode()]), [1]).tag(sync=True)
    base = t.Union([t.Float(), t.Unicode()], default_value=2).tag(sync=True)
    _references = ("rho", "sigma")

    def __init__(self, rho: StateEditor | None = None, sigma: StateEditor | None = None, **kwargs: Any):
        super().__init__(rho=rho, sigma=sigma, **kwargs)

    def _params(self) -> list[str]:
        pairwise = self.quantity in ("hypothesis-testing", "smooth-max-divergence")
        return ["quantity"] + (["epsilon"] if pairwise else ["a", "b"])

    def _request(self) -> dict | None:
        rho = _state(self.rho)
        if rho is None:
            return None
        q = self.quantity
        if q in ("hypothesis-testing", "smooth-max-divergence"):
            sigma = _state(self.sigma)
            if sigma is None:
                return None
            r: dict[str, Any] = {"op": "divergence", "family": "hypothesis-testing"} if q == "hypothesis-testing" else {"op": q}
            r.update({"rho": rho, "sigma": sigma, "epsilon": self.epsilon, "base": self.base})
            return r
        return {"op": q, "rho": rho, "a": list(self.a), "b": list(self.b), "base": self.base}


class Sweep(_FrontendAware, _Base):
    """A sweep in the notebook (docs/sweeps.md, "In the notebook"): the spec's summary, a progress bar with
    the count and rate, Cancel, and a live chart of the rows (the twin of src/widgets/sweep.ts).

        >>> sw = Sweep({"sweep": 1, "seed": 3, "parameters": {"alpha": {"from": 0.5, "to": 2, "count": 7}},
        ...             "draws": {"rho": {"op": "random-state", "dims": [2]}, "sigma": {"op": "random-state", "dims": [2]}},
        ...             "quantity": {"op": "divergence", "family": "sandwiched", "alpha": {"$": "alpha"},
        ...                          "rho": {"$": "rho"}, "sigma": {"$": "sigma"}}})   # doctest: +SKIP
        >>> sw                        # in JupyterLab: the browser runs it in chunks; `rows` grow live
        >>> sw.frame()                # the DataFrame that rhosigma.sweep(spec) returns for these rows

    With a front end the browser runs the points through the page's worker with the op `sweep-points`, the
    op `rhosigma.sweep` asks the headless engine; after each chunk it sends only that chunk's lines (a
    custom message {"event": "rows", "start", "rows"}), which are appended to `rows` here (so the transfer is
    linear in the rows, not quadratic), then `done`, `total` and `status`; `observe(cb, "rows")` sees each
    chunk. A point's line depends only on the spec's
    seed and its index, so the rows equal `rhosigma.sweep(spec)`'s. `auto` (default true) makes the front end
    run when the widget's model is made and whenever `spec` changes. Without a front end nothing runs until
    `run()`, which computes the same rows headless through `sweep_rows` (blocking; `done`/`total` move per
    chunk, `rows` arrive at the end). `cancel()` stops the browser's run after aborting the chunk in flight.
    A widget made and `run()` in the same cell runs in the kernel: the front end's "attached" message is
    read only after the cell.

    Deliberately not here: any numerics (the engine's, in the browser's worker or the kernel's process).
    """

    _model_name = t.Unicode("SweepModel").tag(sync=True)
    _view_name = t.Unicode("SweepView").tag(sync=True)
    spec = t.Dict(default_value=None, allow_none=True).tag(sync=True)
    rows = t.List(t.Dict()).tag(sync=True)
    done = t.Int(0).tag(sync=True)
    total = t.Int(0).tag(sync=True)
    status = t.Unicode("idle").tag(sync=True)
    error = t.Dict(default_value=None, allow_none=True).tag(sync=True)
    plot = t.Dict(default_value={"x": None, "y": None}).tag(sync=True)
    auto = t.Bool(True).tag(sync=True)
    computed_by = t.Unicode(None, allow_none=True).tag(sync=True)

    def __init__(self, spec: Any = None, **kwargs: Any):
        if spec is not None:
            kwargs["spec"] = _read_spec(spec)
        self._attached = False
        self._facts: tuple[str, dict] | None = None
        super().__init__(**kwargs)
        self.on_msg(self._on_custom)

    def _on_custom(self, widget: Any, content: Any, buffers: Any) -> None:
        super()._on_custom(widget, content, buffers)
        if isinstance(content, dict) and content.get("event") == "rows":
            self._append_rows(content.get("start"), content.get("rows"))

    def _append_rows(self, start: Any, rows: Any) -> None:
        """One chunk's lines from the front end, at position `start` of the run's rows.

        The comm delivers messages in order: a run's first message has start 0 and replaces the rows (a new
        run starts with an empty one), each later one starts at the number of rows already here; a message
        that does not fit is ignored rather than leaving rows out of order. The new list is set without sending it back
        to the front end, which has these rows (ipywidgets would send the whole list on every change): the
        trait's value is replaced and traitlets' observers notified, skipping only ipywidgets' sync."""
        if not (isinstance(start, int) and isinstance(rows, list) and all(isinstance(r, dict) for r in rows)):
            return
        old = self.rows
        if start == 0:
            new = list(rows)
        elif start == len(old):
            new = old + rows
        else:
            return
        self._trait_values["rows"] = new
        super(Widget, self).notify_change(t.Bunch(name="rows", old=old, new=new, owner=self, type="change"))

    def run(self, *, chunk: int = DEFAULT_CHUNK, engine: Any = None) -> list[dict] | None:
        """Run the sweep from its first point: in the browser when a front end is attached (the rows arrive
        as `rows`; returns None at once), else headless through `sweep_rows` (returns the rows)."""
        if self._attached:
            self.send({"event": "run"})
            return None
        if self.spec is None:
            raise ValueError("the sweep has no spec")
        spec = dict(self.spec)
        with self.hold_sync():
            self.rows, self.done, self.total, self.error = [], 0, 0, None
            self.status, self.computed_by = "running", "kernel"

        def progress(done: int, total: int) -> None:
            self.done, self.total = done, total

        from .errors import ComputeError

        try:
            rows, facts = sweep_rows(spec, chunk=chunk, engine=engine, progress=progress)
        except ComputeError as e:
            with self.hold_sync():
                self.error = dict(e.answer.get("error") or {"code": e.code, "message": e.message})
                self.status = "error"
            raise
        self._facts = (_json_key(spec), facts)
        with self.hold_sync():
            self.rows = rows
            self.done = len(rows)
            self.total = max(self.total, facts["points"], len(rows))
            self.status = "done"
        return rows

    def cancel(self) -> None:
        """Stop the browser's run: the chunk in flight is aborted, the rows done before it stay
        (status "cancelled"). A headless `run()` blocks the kernel, so there is nothing to cancel then."""
        if self._attached:
            self.send({"event": "cancel"})

    def facts(self, engine: Any = None) -> dict:
        """The sweep's header facts as `rhosigma.sweep` puts them in `df.attrs` (spec hash, seed, engine
        version, mode, points), from the headless engine (one request that evaluates no point)."""
        if self.spec is None:
            raise ValueError("the sweep has no spec")
        key = _json_key(self.spec)
        if self._facts is None or self._facts[0] != key:
            info = _ask(_engine(engine), dict(self.spec), indices=[])
            self._facts = (key, {"specHash": info["specHash"], "seed": self.spec.get("seed"), "engine": info["engine"]["version"],
                                 "mode": info["mode"], "points": info["points"]})
        return dict(self._facts[1])

    def frame(self, engine: Any = None):
        """The rows so far as the pandas DataFrame `rhosigma.sweep(spec)` returns (rows_to_frame), with its attrs."""
        return rows_to_frame(list(self.rows), self.facts(engine), ((self.spec or {}).get("parameters") or {}).keys())

    def __repr__(self) -> str:
        return f"Sweep({self.done} of {self.total} points; {self.status}; by {self.computed_by or '—'})"


def _json_key(spec: Any) -> str:
    return json.dumps(spec, sort_keys=True)
