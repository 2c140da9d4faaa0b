"""`%load_ext rhosigma`: rich display of answers, states and channels, in IPython and in a real kernel.

The answer MIME type and its content follow docs/surfaces.md ("MIME type"); spectra on the cards are
checked against numpy.linalg.eigvalsh (LAPACK).
"""
from __future__ import annotations

import json

import numpy as np
import pytest

import rhosigma as rs
from rhosigma import ANSWER_MIME, Channel, State


@pytest.fixture
def shell():
    from IPython.core.interactiveshell import InteractiveShell

    ip = InteractiveShell.instance()
    ip.extension_manager.load_extension("rhosigma")
    yield ip
    ip.extension_manager.unload_extension("rhosigma")


def test_answers_display_as_the_answer_mime_type_with_plain_text(shell):
    """An answer's bundle: the protocol answer (Infinity spelled as the protocol does) plus its request."""
    answer = rs.compute({"op": "chernoff-exponent", "rho": np.diag([1.0, 0.0]), "sigma": np.diag([0.0, 1.0]), "id": "x"})
    data, _ = shell.display_formatter.format(answer)
    payload = data[ANSWER_MIME]
    json.dumps(payload, allow_nan=False)                      # valid JSON: no inf, no numpy
    assert payload["value"] == "Infinity" and payload["ok"] is True and payload["id"] == "x"
    assert payload["request"] == {"op": "chernoff-exponent", "rho": [[1.0, 0.0], [0.0, 0.0]], "sigma": [[0.0, 0.0], [0.0, 1.0]], "id": "x"}
    assert data["text/plain"].startswith("chernoff-exponent: ∞ bits") and "reason:" in data["text/plain"]
    refused = rs.compute({"op": "entropy", "rho": [[1, 2], [3, 4]]})
    data, _ = shell.display_formatter.format(refused)
    assert data[ANSWER_MIME]["error"]["code"] == "not-hermitian"
    assert "refused, not-hermitian at rho[1][0]" in data["text/plain"]


def test_state_and_channel_cards_show_the_engines_checks(shell):
    """A state's card lists the spectrum (numpy.linalg.eigvalsh) and validity; a channel's card CP/TP/unital."""
    rho = np.array([[0.7, 0.1j], [-0.1j, 0.3]])
    data, _ = shell.display_formatter.format(State(rho, labels=["Q"]))
    card = data["text/html"]
    for lam in np.linalg.eigvalsh(rho):
        assert f"{lam:.4g}" in card
    assert "a valid state" in card and "labels Q" in card and data["text/plain"].startswith("State(")
    data, _ = shell.display_formatter.format(State(np.diag([0.6, 0.6])))
    assert "not a valid state" in data["text/html"] and "trace-not-one" in data["text/html"]
    data, _ = shell.display_formatter.format(Channel.preset("dephasing", d=2, p=0.2))
    assert "completely positive: true" in data["text/html"] and "trace preserving: true" in data["text/html"]


def test_unloading_returns_to_plain_reprs(shell):
    shell.extension_manager.unload_extension("rhosigma")
    data, _ = shell.display_formatter.format(rs.compute({"op": "entropy", "rho": np.eye(2) / 2}))
    assert ANSWER_MIME not in data and data["text/plain"].startswith("Answer(")
    shell.extension_manager.load_extension("rhosigma")


def test_a_real_kernel_displays_answers_after_load_ext():
    """Through jupyter_client and ipykernel: `%load_ext rhosigma` then an answer as the cell's result."""
    from jupyter_client.manager import start_new_kernel

    km, kc = start_new_kernel(kernel_name="python3")   # .venv's kernel; the package is installed there (editable)
    try:
        kc.execute_interactive("%load_ext rhosigma", timeout=60)
        results = []
        reply = kc.execute_interactive(
            "import numpy as np, rhosigma\nrhosigma.compute({'op': 'entropy', 'rho': np.eye(4) / 4, 'id': 'Infinity'})",
            timeout=120,
            output_hook=lambda msg: results.append(msg) if msg["msg_type"] == "execute_result" else None,
        )
        assert reply["content"]["status"] == "ok", reply["content"]
        assert len(results) == 1
        data = results[0]["content"]["data"]
        assert data[ANSWER_MIME]["value"] == 2 and data[ANSWER_MIME]["id"] == "Infinity"
        assert "entropy: 2 bits" in data["text/plain"]
    finally:
        kc.stop_channels()
        km.shutdown_kernel(now=True)
