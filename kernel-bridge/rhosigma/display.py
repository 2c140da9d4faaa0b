"""Rich display in notebooks: `%load_ext rhosigma` registers it with IPython.

- Answers (`rhosigma.Answer`) display as the MIME type `application/vnd.rhosigma.answer+json` (the
  answer's protocol data, with the request under "request" when it is known; docs/surfaces.md) with a
  `text/plain` summary beside it for front ends without the rhosigma renderer.
- `State` objects display as an HTML card: the matrix, dims and labels, and the engine's spectrum and
  checks (Hermiticity defect, smallest eigenvalue, trace, valid at the tolerance or the engine's reason).
- `Channel` objects display as an HTML card: the Kraus operators or the Choi matrix, and the engine's
  complete-positivity, trace-preservation and unitality checks with the size of each violation.
The cards' numbers come from the engine (one request each time a card is shown); if the engine cannot
be reached the card says so instead of failing the cell. Nothing is repaired or rounded away: the card
shows 4 significant digits of what the engine answered and says which tolerance decided.

Deliberately not here: widgets (rhosigma.widgets) and any numerics. Cost: one or two engine requests per
displayed State or Channel; none for answers.
"""
from __future__ import annotations

import html
import math
from typing import Any

import numpy as np

from .answer import Answer
from .convert import Refusal, to_protocol
from .errors import RhosigmaError
from .objects import Channel, State

__all__ = ["ANSWER_MIME", "answer_bundle", "state_bundle", "channel_bundle", "load_ipython_extension", "unload_ipython_extension"]

#: The answer MIME type (docs/surfaces.md, "MIME type").
ANSWER_MIME = "application/vnd.rhosigma.answer+json"

_UNITS = {2: "bits", "e": "nats"}


def _num(x: Any) -> str:
    if isinstance(x, bool):
        return str(x).lower()
    if isinstance(x, float) and math.isinf(x):
        return "∞" if x > 0 else "−∞"
    if isinstance(x, (int, float)):
        return f"{x:.10g}"
    return str(x)


def _unit(request: Any) -> str:
    base = request.get("base", 2) if isinstance(request, dict) else 2
    return _UNITS.get(base, f"log base {base}")


def answer_text(answer: dict, request: Any = None) -> str:
    """One or two lines a person can read: the op, the value (or the refusal) and the conventions."""
    op = answer.get("op") or "request"
    if not answer.get("ok"):
        err = answer.get("error") or {}
        where = f" at {err['path']}" if err.get("path") else ""
        return f"{op}: refused, {err.get('code')}{where}: {err.get('message', '')}"
    value = answer.get("value")
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        text = f"{op}: {_num(value)}"
        if op in _LOGARITHMIC:
            text += f" {_unit(request)}"
    elif isinstance(value, bool):
        text = f"{op}: {_num(value)}"
    elif isinstance(value, list):
        text = f"{op}: a {len(value)}-row result"
    else:
        text = f"{op}: {type(value).__name__} result"
    if "root" in answer:
        text += f" (squared fidelity; root {_num(answer['root'])})"
    cert = answer.get("certificate")
    if isinstance(cert, dict) and "status" in cert:
        gap = f", gap {_num(cert['gap'])}" if "gap" in cert else ""
        text += f"\ncertificate: {cert['status']}{gap}"
    if "reason" in answer:
        text += f"\nreason: {answer['reason']}"
    return text


_LOGARITHMIC = {
    "entropy", "conditional-entropy", "mutual-information", "conditional-mutual-information", "conditional-renyi-entropy",
    "conditional-min-entropy", "conditional-max-entropy", "max-information", "divergence", "smooth-max-divergence",
    "expectation-divergence", "chernoff-exponent",
}


def answer_bundle(answer: Answer) -> dict:
    """The MIME bundle of an answer: the answer MIME type (JSON data) and text/plain."""
    data = answer.to_protocol_data() if isinstance(answer, Answer) else dict(answer)
    request = getattr(answer, "request", None)
    if request is not None:
        try:
            data["request"] = to_protocol(request)
        except Refusal:
            pass  # a request that could not be sent has no protocol form to show
    return {ANSWER_MIME: data, "text/plain": answer_text(answer, request)}


def _matrix_html(m: np.ndarray, max_side: int = 12) -> str:
    rows = []
    n, k = m.shape
    for i in range(min(n, max_side)):
        cells = []
        for j in range(min(k, max_side)):
            z = complex(m[i, j])
            if abs(z.imag) > 0:
                text = f"{z.real:.4g}{'+' if z.imag >= 0 else '−'}{abs(z.imag):.4g}i"
            else:
                text = f"{z.real:.4g}"
            cells.append(f"<td>{html.escape(text)}</td>")
        if k > max_side:
            cells.append("<td>…</td>")
        rows.append("<tr>" + "".join(cells) + "</tr>")
    if n > max_side:
        rows.append(f"<tr><td colspan='{min(k, max_side) + 1}'>… {n}×{k} in all</td></tr>")
    return "<table class='rs-matrix'>" + "".join(rows) + "</table>"


def _card(title: str, body: str) -> str:
    return f"<div class='rs-card'><div class='rs-card-title'><b>{html.escape(title)}</b></div>{body}</div>"


def state_bundle(state: State) -> dict:
    """HTML card (matrix, spectrum, checks from the engine) and the repr as text/plain."""
    what = f"State on dims {state.dims}" + (f", labels {', '.join(state.labels)}" if state.labels else "")
    parts = [_matrix_html(state.matrix)]
    try:
        checks = state.checks()
    except RhosigmaError as err:
        parts.append(f"<p>The engine could not check this state: {html.escape(str(err))}</p>")
    else:
        items = []
        if "spectrum" in checks:
            spec = ", ".join(f"{x:.4g}" for x in checks["spectrum"][:16]) + (" …" if len(checks["spectrum"]) > 16 else "")
            items.append(f"<li>spectrum: {html.escape(spec)}</li>")
            items.append(f"<li>Hermiticity defect {checks['hermiticity_defect']:.3g}; smallest eigenvalue {checks['min_eigenvalue']:.4g}; trace {checks['trace']:.10g}</li>")
        if checks["valid"]:
            items.append(f"<li>a valid state at tolerance {checks['tolerance']:g}</li>")
        else:
            p = checks["problem"]
            items.append(f"<li><b>not a valid state</b> at tolerance {checks['tolerance']:g}: {html.escape(str(p.get('code')))}: {html.escape(str(p.get('message')))}</li>")
        parts.append("<ul>" + "".join(items) + "</ul>")
    return {"text/html": _card(what, "".join(parts)), "text/plain": repr(state)}


def channel_bundle(channel: Channel) -> dict:
    """HTML card (Kraus operators or Choi matrix, and the engine's CP/TP/unital checks) and the repr."""
    form = f"{len(channel.kraus)} Kraus operator(s)" if channel.kraus is not None else "Choi matrix"
    what = f"Channel {channel.from_dims} → {channel.to_dims}, {form}"
    mats = channel.kraus[:4] if channel.kraus is not None else [channel.choi]
    parts = ["".join(_matrix_html(m) for m in mats)]
    try:
        c = channel.checks()
    except RhosigmaError as err:
        parts.append(f"<p>The engine could not check this channel: {html.escape(str(err))}</p>")
    else:
        keys = [("completelyPositive", "minChoiEigenvalue", "completely positive", "smallest Choi eigenvalue"),
                ("tracePreserving", "traceDefect", "trace preserving", "defect"),
                ("unital", "unitalDefect", "unital", "defect")]
        items = [
            f"<li>{label}: {_num(c.get(flag))} ({size_label} {_num(c.get(size))})</li>"
            for flag, size, label, size_label in keys if flag in c
        ]
        if "tolerance" in c:
            items.append(f"<li>decided at tolerance {_num(c['tolerance'])}</li>")
        parts.append("<ul>" + "".join(items) + "</ul>")
    return {"text/html": _card(what, "".join(parts)), "text/plain": repr(channel)}


_REGISTERED = ((Answer, answer_bundle), (State, state_bundle), (Channel, channel_bundle))


def _answer_pretty(answer: Answer, p: Any, cycle: bool) -> None:
    # An Answer is a dict: IPython's text/plain printer for dicts would otherwise win over the bundle's.
    p.text(answer_text(answer, answer.request))


def load_ipython_extension(ipython: Any) -> None:
    """`%load_ext rhosigma`: rich display of answers, states and channels in this kernel."""
    formatter = ipython.display_formatter.mimebundle_formatter
    for cls, func in _REGISTERED:
        formatter.for_type(cls, func)
    ipython.display_formatter.formatters["text/plain"].for_type(Answer, _answer_pretty)


def unload_ipython_extension(ipython: Any) -> None:
    """`%unload_ext rhosigma`: back to the plain reprs."""
    formatter = ipython.display_formatter.mimebundle_formatter
    for cls, _ in _REGISTERED:
        formatter.type_printers.pop(cls, None)
    ipython.display_formatter.formatters["text/plain"].type_printers.pop(Answer, None)
