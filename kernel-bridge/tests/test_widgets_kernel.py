"""The widgets in a real kernel (ipykernel through jupyter_client; no front end, no mocks).

Facts checked:
- the comm-open messages of rhosigma.widgets carry the model names, the module name and the module
  version that the TypeScript package declares (src/widgets/schema.ts and version.ts, read by running
  them under node; package.json's name and version), and every field of the TypeScript model's defaults;
- an update sent the way a front end sends it (comm_msg, method "update") reaches the Python object, and
  a calculator recomputes from the edited editor;
- once a front end says it is attached, the result it sets is the calculator's `result`, `observe`
  callbacks and `next_result()` see it, and the kernel does not compute the request itself;
- a sweep widget with a front end attached asks it to run (`run()`, `cancel()`: custom messages) instead
  of computing in the kernel; the rows the front end sends (here: the lines the headless engine gives for
  the same spec, sent the way JupyterLab sends an update) are its `rows`, seen by `observe`, and `frame()`
  is `rhosigma.sweep(spec)`'s DataFrame (a consistency check between two paths of the same engine);
- with no front end the kernel computes through the headless engine, with numpy as the outside
  reference for the number (the Umegaki relative entropy of two commuting states is the classical
  Kullback–Leibler divergence of their eigenvalues: Umegaki 1962; Nielsen & Chuang, §11.3).
"""
from __future__ import annotations

import json
import subprocess
from pathlib import Path

import numpy as np
import pytest

from rhosigma import _frontend

ROOT = Path(__file__).resolve().parents[2]

PROLOGUE = """
import json, numpy as np
from rhosigma.widgets import StateEditor, DivergenceCalculator, GuessingCalculator, Sweep
rho = StateEditor(np.diag([0.7, 0.3]))
sigma = StateEditor(np.eye(2) / 2)
calc = DivergenceCalculator(rho, sigma)
guess = GuessingCalculator([StateEditor(np.diag([1.0, 0.0])), StateEditor(np.full((2, 2), 0.5))])
sweep_spec = {"sweep": 1, "seed": 5, "parameters": {"alpha": {"values": [0.5, 2]}},
              "draws": {"rho": {"op": "random-state", "dims": [2]}, "sigma": {"op": "random-state", "dims": [2]}},
              "quantity": {"op": "divergence", "family": "sandwiched", "alpha": {"$": "alpha"}, "rho": {"$": "rho"}, "sigma": {"$": "sigma"}}}
sw = Sweep(sweep_spec)
print(json.dumps({"rho": rho.model_id, "sigma": sigma.model_id, "calc": calc.model_id}))
"""

# DOMWidget's own traits, which the TypeScript models inherit from DOMWidgetModel's defaults.
BASE_TRAITS = {"layout", "tabbable", "tooltip", "_dom_classes", "_model_module", "_model_module_version", "_model_name",
               "_view_count", "_view_module", "_view_module_version", "_view_name"}


def typescript_models() -> dict:
    """src/widgets/schema.ts's MODELS and version.ts's constants, as node evaluates them (tsx)."""
    script = (
        "const s = await import('./src/widgets/schema.ts'); const v = await import('./src/widgets/version.ts');"
        "console.log(JSON.stringify({ models: s.MODELS, name: v.MODULE_NAME, version: v.MODULE_VERSION, registered: v.PACKAGE_VERSION }));"
    )
    out = subprocess.run(["node", "--import", "tsx", "--input-type=module", "-e", script], cwd=ROOT, capture_output=True, text=True, timeout=120, check=True)
    return json.loads(out.stdout)


@pytest.fixture(scope="module")
def ts() -> dict:
    return typescript_models()


@pytest.fixture(scope="module")
def kernel():
    from jupyter_client.manager import start_new_kernel

    km, kc = start_new_kernel(kernel_name="python3")
    try:
        msgs, text = run(kc, PROLOGUE)
        kc.prologue = (msgs, text)
        yield kc
    finally:
        kc.stop_channels()
        km.shutdown_kernel(now=True)


def run(kc, code: str, *, timeout: float = 120) -> tuple[list[dict], str]:
    """Executes `code`; returns the iopub messages and the printed text."""
    msgs: list[dict] = []
    reply = kc.execute_interactive(code, timeout=timeout, output_hook=msgs.append)
    assert reply["content"]["status"] == "ok", reply["content"]
    text = "".join(m["content"]["text"] for m in msgs if m["msg_type"] == "stream" and m["content"]["name"] == "stdout")
    return msgs, text


def front_end_update(kc, comm_id: str, state: dict) -> None:
    """What JupyterLab's widget manager sends when a view changes a model (widget message protocol 2)."""
    kc.shell_channel.send(kc.session.msg("comm_msg", {"comm_id": comm_id, "data": {"method": "update", "state": state, "buffer_paths": []}}))


def front_end_custom(kc, comm_id: str, content: dict) -> None:
    kc.shell_channel.send(kc.session.msg("comm_msg", {"comm_id": comm_id, "data": {"method": "custom", "content": content}}))


def test_module_name_and_version_are_the_typescript_packages(ts):
    pkg = json.loads((ROOT / "package.json").read_text(encoding="utf-8"))
    assert ts["name"] == pkg["name"] == _frontend.MODULE_NAME
    assert ts["version"] == "^" + pkg["version"] == _frontend.MODULE_VERSION
    # The plugin registers the exact version, which the models' range must accept.
    assert ts["registered"] == pkg["version"]


def test_comm_open_carries_the_typescript_model_names_module_and_fields(kernel, ts):
    msgs, text = kernel.prologue
    opens = [m["content"] for m in msgs if m["msg_type"] == "comm_open" and m["content"]["target_name"] == "jupyter.widget"]
    ours = [c for c in opens if c["data"]["state"].get("_model_module") == ts["name"]]
    assert {c["data"]["state"]["_model_name"] for c in ours} == {"StateEditorModel", "DivergenceCalculatorModel", "GuessingCalculatorModel", "SweepModel"}
    for c in ours:
        state = c["data"]["state"]
        spec = ts["models"][state["_model_name"]]
        assert state["_model_module_version"] == ts["version"]
        assert state["_view_module"] == ts["name"] and state["_view_module_version"] == ts["version"]
        assert state["_view_name"] == spec["view"]
        assert set(state) - BASE_TRAITS == set(spec["defaults"]), state["_model_name"]
        # Widget references travel as "IPY_MODEL_<id>" (ipywidgets' widget serialization).
        for field in spec["references"]:
            refs = state[field] if isinstance(state[field], list) else [state[field]]
            assert all(isinstance(r, str) and r.startswith("IPY_MODEL_") for r in refs), (field, state[field])
    ids = json.loads(text.strip().splitlines()[-1])
    assert ids["calc"] in {c["comm_id"] for c in ours}


def test_every_typescript_model_has_a_python_class(ts):
    import rhosigma.widgets as w

    names = {getattr(w, n)._model_name.default_value for n in w.__all__}
    assert names == set(ts["models"])


def test_a_front_end_edit_reaches_python_and_the_kernel_recomputes_without_a_front_end(kernel):
    _, text = run(kernel, "print(json.dumps({'rho': rho.model_id, 'calc': calc.model_id}))")
    ids = json.loads(text)
    front_end_update(kernel, ids["rho"], {"matrix": [[0.9, 0], [0, 0.1]]})
    _, text = run(kernel, "print(json.dumps({'matrix': rho.matrix, 'value': calc.value, 'by': calc.computed_by, 'request': calc.request}))")
    got = json.loads(text)
    assert got["matrix"] == [[0.9, 0], [0, 0.1]]
    assert got["request"]["rho"]["matrix"] == [[0.9, 0], [0, 0.1]]
    assert got["by"] == "kernel"
    p, q = np.array([0.9, 0.1]), np.array([0.5, 0.5])
    assert got["value"] == pytest.approx(float(np.sum(p * np.log2(p / q))), rel=1e-12)


def test_a_front_ends_result_is_the_calculators_result_seen_by_observe_and_next_result(kernel):
    _, text = run(kernel, (
        "seen = []\n"
        "calc.observe(lambda ch: seen.append(ch['new']), 'result')\n"
        "waiting = calc.next_result()\n"
        "print(json.dumps({'calc': calc.model_id, 'rho': rho.model_id}))"
    ))
    ids = json.loads(text)
    front_end_custom(kernel, ids["calc"], {"event": "attached"})
    answer = {"ok": True, "op": "divergence", "value": 0.125, "family": "umegaki", "base": 2}
    request = {"op": "divergence", "family": "umegaki", "rho": {"matrix": [[0.9, 0], [0, 0.1]], "dims": [2]}, "sigma": {"matrix": [[0.5, 0], [0, 0.5]], "dims": [2]}, "base": 2}
    front_end_update(kernel, ids["calc"], {"result": answer, "request": request, "status": "done", "computed_by": "browser"})
    _, text = run(kernel, "r = await waiting\nprint(json.dumps({'awaited': r, 'seen': seen, 'result': calc.result, 'by': calc.computed_by, 'attached': calc.frontend_attached}))")
    got = json.loads(text)
    assert got["awaited"] == answer and got["seen"] == [answer] and got["result"] == answer
    assert got["by"] == "browser" and got["attached"] is True
    # With a front end attached, an edit leaves the computing to it: the kernel does not recompute.
    front_end_update(kernel, ids["rho"], {"matrix": [[0.8, 0], [0, 0.2]]})
    _, text = run(kernel, "print(json.dumps({'result': calc.result, 'matrix': rho.matrix}))")
    got = json.loads(text)
    assert got["matrix"] == [[0.8, 0], [0, 0.2]] and got["result"] == answer


def test_packed_matrices_travel_as_binary_buffers_both_ways(kernel):
    # A 16×16 state has 256 entries, so convert.py sends it packed (PACK_MIN_ENTRIES); over the comm its
    # float64 bytes travel as a binary buffer of the message (ipywidgets' buffer_paths), not as base64
    # text inside the JSON. The reference for the bytes is numpy's own little-endian float64 encoding.
    rng = np.random.default_rng(5)
    g = rng.normal(size=(16, 16))
    m = g @ g.T
    m /= np.trace(m)
    msgs, text = run(kernel, (
        "big = StateEditor(np.array(json.loads(" + repr(json.dumps(m.tolist())) + ")))\n"
        "print(json.dumps({'big': big.model_id}))"
    ))
    ids = json.loads(text)
    opens = [x for x in msgs if x["msg_type"] == "comm_open" and x["content"]["comm_id"] == ids["big"]]
    assert len(opens) == 1
    data = opens[0]["content"]["data"]
    assert ["matrix", "re"] in data["buffer_paths"], data["buffer_paths"]
    assert "re" not in data["state"]["matrix"] and data["state"]["matrix"]["packed"] == "float64-le"
    k = data["buffer_paths"].index(["matrix", "re"])
    assert bytes(opens[0]["buffers"][k]) == np.ascontiguousarray(m, dtype="<f8").tobytes()
    # The front end sends an edited matrix the same way: bytes in a buffer, restored into the trait as
    # the protocol's base64 text, so the Python object reads the exact numbers.
    m2 = m.copy()
    m2[0, 0] += 1e-3
    m2 /= np.trace(m2)
    state = {"matrix": {"shape": [16, 16], "packed": "float64-le"}}
    msg = kernel.session.msg("comm_msg", {"comm_id": ids["big"], "data": {"method": "update", "state": state, "buffer_paths": [["matrix", "re"]]}})
    kernel.session.send(kernel.shell_channel.socket, msg, buffers=[np.ascontiguousarray(m2, dtype="<f8").tobytes()])
    _, text = run(kernel, "print(json.dumps({'re_is_text': isinstance(big.matrix['re'], str), 'value': big.value.tolist()}))")
    got = json.loads(text)
    assert got["re_is_text"] is True
    assert np.array_equal(np.array(got["value"]), m2)


def test_a_sweep_with_a_front_end_asks_it_to_run_and_its_rows_reach_python(kernel):
    _, text = run(kernel, "print(json.dumps({'sw': sw.model_id, 'status': sw.status, 'rows': sw.rows}))")
    ids = json.loads(text)
    assert ids["status"] == "idle" and ids["rows"] == [], "nothing runs in the kernel before run()"
    front_end_custom(kernel, ids["sw"], {"event": "attached"})
    msgs, _ = run(kernel, "sweep_seen = []\nsw.observe(lambda ch: sweep_seen.append(len(ch['new'])), 'rows')\nsw.run()\nsw.cancel()\nprint(sw.status)")
    sent = [m["content"]["data"] for m in msgs if m["msg_type"] == "comm_msg" and m["content"]["comm_id"] == ids["sw"]]
    assert {"method": "custom", "content": {"event": "run"}} in sent, sent
    assert {"method": "custom", "content": {"event": "cancel"}} in sent, sent
    # The lines of the same spec from the headless engine, sent in two updates as the front end sends chunks.
    _, text = run(kernel, "from rhosigma.sweeps import sweep_rows\nprint(json.dumps(sweep_rows(sweep_spec)[0]))")
    lines = json.loads(text)
    assert [r["index"] for r in lines] == [0, 1]
    front_end_update(kernel, ids["sw"], {"rows": lines[:1], "done": 1, "total": 2, "status": "running", "computed_by": "browser"})
    front_end_update(kernel, ids["sw"], {"rows": lines, "done": 2, "total": 2, "status": "done", "computed_by": "browser"})
    _, text = run(kernel, (
        "import rhosigma\n"
        "print(json.dumps({'seen': sweep_seen, 'rows': sw.rows, 'status': sw.status, 'by': sw.computed_by, 'attached': sw.frontend_attached,"
        " 'same_frame': sw.frame().equals(rhosigma.sweep(sweep_spec)), 'attrs': sw.frame().attrs == rhosigma.sweep(sweep_spec).attrs}))"
    ))
    got = json.loads(text)
    assert got["seen"] == [1, 2] and got["rows"] == lines
    assert got["status"] == "done" and got["by"] == "browser" and got["attached"] is True
    assert got["same_frame"] is True and got["attrs"] is True
