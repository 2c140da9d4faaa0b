"""The headless engine (rhosigma.engine) against the real `rhosigma serve` and `rhosigma compute` processes.

Numbers are checked against numpy 2.x (numpy.linalg.eigvalsh, LAPACK); everything else against the
protocol (docs/protocol.md) and the command's own answers.
"""
from __future__ import annotations

import json
import math
import os
import signal
import stat
import subprocess
import threading
import time

import numpy as np
import pytest

import rhosigma
from rhosigma import ComputeError, Engine, EngineNotFound, EngineStartError
from rhosigma.convert import from_protocol

from conftest import BIN, PYTHON, ROOT, cli_compute, group_members, kill_when_busy, wait_until_idle, numpy_entropy, random_density, random_hermitian, slow_request


def parity_batch():
    """Requests with numpy arrays (small ones as rows, large ones packed) and their plain-JSON twins."""
    rng = np.random.default_rng(20240611)
    rho = random_density(4, rng)
    sigma = random_density(4, rng)
    big = random_hermitian(24, rng)          # 576 entries: travels packed
    real_big = np.real(random_hermitian(20, rng))
    numpy_requests = [
        {"op": "entropy", "rho": rho, "id": 1},
        {"op": "entropy", "rho": {"matrix": rho, "dims": [2, 2]}, "alpha": 2.0},
        {"op": "divergence", "family": "umegaki", "rho": rho, "sigma": sigma},
        {"op": "divergence", "family": "sandwiched", "alpha": 1.5, "rho": rho, "sigma": sigma, "base": "e"},
        {"op": "fidelity", "rho": rho, "sigma": sigma},
        {"op": "spectrum", "matrix": big, "vectors": True},
        {"op": "spectrum", "matrix": real_big},
        {"op": "partial-trace", "matrix": rho, "dims": [2, 2], "over": [1]},
        {"op": "chernoff-exponent", "rho": np.diag([1.0, 0.0]), "sigma": np.diag([0.0, 1.0])},
        {"op": "conditional-mutual-information", "rho": {"matrix": random_density(8, rng), "dims": [2, 2, 2]}, "a": [0], "b": [1], "c": [2]},
        {"op": "entropy", "rho": [[1, 2], [3, 4]], "id": "bad"},
        {"op": "no-such-op"},
    ]
    plain_requests = json.loads(json.dumps(numpy_requests, default=lambda a: _plain(a)))
    return numpy_requests, plain_requests, rho, big, real_big


def _plain(a):
    """The plain JSON form of a numpy array: rows of numbers, or {"re", "im"} rows."""
    if np.iscomplexobj(a) and np.any(a.imag != 0):
        return {"re": a.real.tolist(), "im": a.imag.tolist()}
    return np.real(a).tolist()


def test_headless_parity_with_the_command():
    """The same requests through rhosigma.compute and through `rhosigma compute` give identical answers."""
    numpy_requests, plain_requests, rho, big, real_big = parity_batch()
    expected = cli_compute(plain_requests)
    raw = rhosigma.default_engine().compute_raw(numpy_requests)
    assert raw == expected                                    # byte-for-byte the same JSON data
    answers = rhosigma.compute(numpy_requests)
    assert answers == [from_protocol(a) for a in expected]    # and the same after "Infinity" → inf
    assert [a.request for a in answers] == numpy_requests or all(a.request is r for a, r in zip(answers, numpy_requests))
    # Against numpy 2.x: the entropy and both spectra (numpy.linalg.eigvalsh, LAPACK).
    assert math.isclose(answers[0]["value"], numpy_entropy(rho), abs_tol=1e-12)
    assert np.allclose(answers[5]["value"], np.linalg.eigvalsh(big), atol=1e-11)
    assert np.allclose(answers[6]["value"], np.linalg.eigvalsh(real_big), atol=1e-11)
    assert answers[8]["value"] == math.inf and isinstance(answers[8]["reason"], str)
    assert answers[10]["error"]["code"] == "not-hermitian" and answers[10]["id"] == "bad"
    assert answers[11]["error"]["code"] == "unknown-op"


def test_a_bad_request_raises_with_the_protocols_code_and_path():
    """A refusal keeps its answer; raise_for_error raises ComputeError with code, message and path (protocol: Answers)."""
    answer = rhosigma.compute({"op": "entropy", "rho": {"matrix": [[0.5, 0], [0, "x"]]}})
    assert answer["ok"] is False
    with pytest.raises(ComputeError) as info:
        answer.raise_for_error()
    err = info.value
    assert (err.code, err.path, err.op) == ("parse-error", "rho.matrix[1][1]", "entropy")
    assert "x" in err.message and err.answer["error"]["message"] == err.message
    with pytest.raises(ComputeError) as info:
        rhosigma.compute({"op": "entropy", "rho": [[1, 2], [3, 4]]}).value
    assert info.value.code == "not-hermitian" and info.value.path == "rho[1][0]"
    assert info.value.detail == {"defect": 1}


def test_nan_fails_only_its_own_request():
    """A NaN in a numpy array fails that request alone, with 'invalid-argument' and the entry's path."""
    rng = np.random.default_rng(3)
    rho = random_density(3, rng)
    bad = rho.copy()
    bad[1, 2] = np.nan
    big_bad = np.eye(20) / 20
    big_bad[7, 3] = np.nan                       # would travel packed: refused before packing
    answers = rhosigma.compute([
        {"op": "entropy", "rho": rho},
        {"op": "entropy", "rho": {"matrix": bad}, "id": "nan"},
        {"op": "entropy", "rho": big_bad},
        {"op": "entropy", "rho": rho, "alpha": float("nan")},
        {"op": "entropy", "rho": rho},
    ])
    assert [a["ok"] for a in answers] == [True, False, False, False, True]
    assert answers[1]["error"]["code"] == "invalid-argument" and answers[1]["error"]["path"] == "rho.matrix[1][2]"
    assert answers[1]["id"] == "nan" and answers[1]["op"] == "entropy"
    assert answers[2]["error"]["path"] == "rho[7][3]"
    assert answers[3]["error"]["path"] == "alpha"
    for a in (answers[0], answers[4]):
        assert math.isclose(a["value"], numpy_entropy(rho), abs_tol=1e-12)  # numpy.linalg.eigvalsh


def test_infinity_strings_in_ids_and_labels_stay_strings():
    """Only numbers become float('inf'): an id or a label spelled "Infinity" is still a string (protocol: Values)."""
    answer = rhosigma.compute({
        "op": "partial-trace", "id": "Infinity", "matrix": np.eye(4) / 4, "dims": [2, 2],
        "labels": ["Infinity", "-Infinity"], "over": ["-Infinity"],
    })
    assert answer["ok"], answer
    assert answer["id"] == "Infinity" and answer["labels"] == ["Infinity"]
    inf = rhosigma.compute({"op": "entropy", "rho": np.diag([0.5, 0.5]), "alpha": float("inf"), "id": "-Infinity"})
    assert inf["id"] == "-Infinity" and inf["alpha"] == math.inf          # alpha is a number: converted
    assert math.isclose(inf["value"], 1.0, abs_tol=1e-12)                 # min-entropy −log2 λmax = 1


def test_utf8_answers_under_the_c_locale():
    """Output is decoded as UTF-8 whatever the locale: a C locale reads "ρ" in an answer (the old bridge failed)."""
    code = (
        "import rhosigma, locale, sys\n"
        # ASCII source (a C locale cannot pass "ρ" on the command line): \u03c1 is ρ, \u03c3 is σ.
        "a = rhosigma.compute({'op': 'partial-trace', 'id': '\\u03c1\\u03c3', 'matrix': [[0.5, 0], [0, 0.5]], 'dims': [2],"
        " 'labels': ['\\u03c1_A'], 'keep': ['\\u03c1_A']})\n"
        "assert a['ok'], a\n"
        "print(ascii(a['id']), ascii(a['labels']), locale.getpreferredencoding(False))\n"
    )
    env = {k: v for k, v in os.environ.items() if not k.startswith(("LC_", "LANG", "PYTHONIOENCODING", "PYTHONUTF8"))}
    env.update(LC_ALL="C", LANG="C", PYTHONUTF8="0", PYTHONCOERCECLOCALE="0")
    out = subprocess.run([PYTHON, "-c", code], env=env, capture_output=True, timeout=120, cwd=ROOT / "kernel-bridge")
    assert out.returncode == 0, out.stderr.decode("utf-8", "replace")
    ident, labels, encoding = out.stdout.decode("ascii").split()
    assert ident == ascii("ρσ") and labels == ascii(["ρ_A"]).replace(" ", "")
    assert encoding.upper() in ("ANSI_X3.4-1968", "ASCII", "US-ASCII")    # the locale really was C


def test_killing_the_engine_mid_batch_is_survived(engine):
    """SIGKILL during a batch: the request in flight is answered 'internal-error', the rest by a new process."""
    rng = np.random.default_rng(11)
    states = [random_density(4, rng) for _ in range(6)]
    requests = [{"op": "entropy", "rho": s, "id": k} for k, s in enumerate(states[:3])]
    requests.append(slow_request(id=3))
    requests += [{"op": "entropy", "rho": s, "id": k + 4} for k, s in enumerate(states[3:])]
    engine.start()
    first_pid = engine.pid
    wait_until_idle(first_pid)                  # past the warm-up that `serve` does while idle
    killer = kill_when_busy(first_pid)          # once the engine is busy computing: on the slow request
    answers = engine.compute_batch(requests)
    killer.join()
    failed = [a for a in answers if not a["ok"]]
    assert [a["id"] for a in failed] == [3], [a.get("error") for a in failed]
    assert failed[0]["error"]["code"] == "internal-error" and "SIGKILL" in failed[0]["error"]["message"]
    assert failed[0]["op"] == "diamond-distance"
    assert engine.starts == 2 and engine.pid != first_pid
    assert [a["id"] for a in answers] == list(range(7))                  # order kept across the restart
    for a, rho in zip([a for a in answers if a["ok"]], states):         # numpy.linalg.eigvalsh (LAPACK)
        assert math.isclose(a["value"], numpy_entropy(rho), abs_tol=1e-12)


def test_a_timeout_kills_a_wrapper_started_engine(tmp_path, engine):
    """After a timeout nothing of an engine started through a wrapper script keeps running (the old bridge's defect)."""
    wrapper = tmp_path / "engine-wrapper.sh"
    wrapper.write_text(f'#!/bin/sh\n# not exec: node runs as a child of this shell\nnode "{BIN}" "$@"\necho done\n')
    wrapper.chmod(wrapper.stat().st_mode | stat.S_IXUSR)
    slow = Engine([str(wrapper)])
    try:
        slow.start()
        pgid = slow.pid
        members = group_members(pgid)
        assert len(members) >= 2, "the wrapper and its node child"
        # The request's own deadline (60 s) keeps the engine computing past the 0.3 s timeout: the
        # process group must be killed (after the grace) for the answer to come.
        answer = slow.compute(slow_request(id="slow", deadline=60000), timeout=0.3)
        assert answer["error"]["code"] == "deadline-exceeded" and answer["id"] == "slow"
        assert "stopped" in answer["error"]["message"] and "path" not in answer["error"]
        # SIGKILL went to the whole group; the node grandchild may take a moment to finish dying (left
        # alone it would go on with the SDP, then wait for more input).
        deadline = time.monotonic() + 1.5
        while group_members(pgid) and time.monotonic() < deadline:
            time.sleep(0.05)
        assert group_members(pgid) == []       # the shell and its node child: gone (zombies aside)
        # The next request is answered by a restarted engine. (No timeout here: a fresh engine's first
        # request pays its start-up, which on a loaded machine can exceed a sub-second budget.)
        after = slow.compute({"op": "entropy", "rho": np.eye(2) / 2, "id": "after"})
        assert after["ok"] and after["value"] == 1 and slow.starts == 2
    finally:
        slow.close()


def test_rhosigma_command_is_split_like_a_shell(tmp_path, monkeypatch):
    """$RHOSIGMA_COMMAND is parsed with shlex: a quoted path with spaces and a quoted argument arrive whole."""
    folder = tmp_path / "engine folder"
    folder.mkdir()
    wrapper = folder / "run engine.sh"
    seen = tmp_path / "seen.txt"
    wrapper.write_text(f'#!/bin/sh\nprintf "%s\\n" "$1" > "{seen}"\nshift\nexec node "{BIN}" "$@"\n')
    wrapper.chmod(wrapper.stat().st_mode | stat.S_IXUSR)
    monkeypatch.setenv("RHOSIGMA_COMMAND", f"'{wrapper}' \"an argument with spaces\"")
    assert rhosigma.engine_command() == [str(wrapper), "an argument with spaces"]
    with Engine() as e:
        assert e.compute({"op": "entropy", "rho": np.eye(2) / 2})["value"] == 1
    assert seen.read_text() == "an argument with spaces\n"


def test_startup_failures_raise_the_packages_own_errors(tmp_path, monkeypatch):
    """No command, a command that exits, one that prints something else, one that never gets ready."""
    monkeypatch.setenv("RHOSIGMA_COMMAND", str(tmp_path / "no-such-engine"))
    with pytest.raises(EngineNotFound):
        Engine().start()
    monkeypatch.setenv("RHOSIGMA_COMMAND", "'unbalanced")
    with pytest.raises(EngineNotFound):
        rhosigma.engine_command()
    monkeypatch.delenv("RHOSIGMA_COMMAND")
    with pytest.raises(EngineStartError) as info:
        Engine(["sh", "-c", "echo the engine is broken >&2; exit 3"]).start()
    assert info.value.returncode == 3 and "the engine is broken" in info.value.stderr
    with pytest.raises(EngineStartError) as info:
        Engine(["sh", "-c", "echo hello; sleep 30"]).start()
    assert "hello" in str(info.value)
    t0 = time.monotonic()
    with pytest.raises(EngineStartError) as info:
        Engine(["sh", "-c", "sleep 30"], start_timeout=0.5).start()
    assert time.monotonic() - t0 < 10 and "no ready line" in str(info.value)
    assert issubclass(EngineNotFound, rhosigma.EngineError) and issubclass(EngineStartError, rhosigma.RhosigmaError)


def test_threads_share_one_engine():
    """Four threads computing at once each get their own answers (numpy.linalg.eigvalsh as the reference)."""
    engine = rhosigma.default_engine()
    errors: list[str] = []

    def work(seed: int) -> None:
        rng = np.random.default_rng(seed)
        for _ in range(15):
            rho = random_density(3, rng)
            got = engine.compute({"op": "entropy", "rho": rho, "id": seed})
            if got["id"] != seed or not math.isclose(got["value"], numpy_entropy(rho), abs_tol=1e-12):
                errors.append(f"thread {seed}: {got}")

    threads = [threading.Thread(target=work, args=(s,)) for s in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert errors == []


def test_answers_name_the_engine_and_close_cleanly():
    """The ready line names the engine and protocol 1.x; close() ends the process (exit code 0 at end of input)."""
    e = Engine()
    ready = e.start()
    assert ready["engine"] == "rhosigma" and ready["protocol"].startswith("1.")
    assert ready["version"] == json.loads((ROOT / "package.json").read_text())["version"] == rhosigma.__version__
    proc = e._proc
    e.close()
    assert proc.returncode == 0 and e.pid is None


def test_an_interrupt_never_misaligns_answers(engine):
    """A KeyboardInterrupt (a kernel interrupt) during a request stops that engine; the next answer is the next request's."""
    engine.start()
    wait_until_idle(engine.pid)
    main = threading.main_thread().ident
    t = kill_when_busy(engine.pid, action=lambda: signal.pthread_kill(main, signal.SIGINT))
    with pytest.raises(KeyboardInterrupt):
        engine.compute(slow_request(id="interrupted"))
    t.join()
    answer = engine.compute({"op": "entropy", "rho": np.eye(2) / 2, "id": "next"})
    assert answer["id"] == "next" and answer["value"] == 1 and engine.starts == 2


def test_a_forked_child_gets_an_engine_of_its_own():
    """After os.fork the child starts its own process instead of sharing the parent's pipes."""
    parent = rhosigma.default_engine()
    parent.start()
    parent_pid = parent.pid
    read, write = os.pipe()
    child = os.fork()
    if child == 0:  # pragma: no cover - runs in the child
        try:
            a = rhosigma.compute({"op": "entropy", "rho": np.eye(4) / 4})
            os.write(write, json.dumps([a["value"], rhosigma.default_engine().pid]).encode())
        finally:
            os._exit(0)
    os.close(write)
    os.waitpid(child, 0)
    value, child_engine = json.loads(os.read(read, 1000))
    os.close(read)
    assert value == 2 and child_engine != parent_pid
    assert parent.pid == parent_pid and rhosigma.compute({"op": "entropy", "rho": np.eye(2) / 2})["value"] == 1


def test_answers_made_in_python_follow_the_answer_schema(engine):
    """Local refusals, deaths and timeouts are protocol failures (schema/protocol.schema.json, checked with jsonschema)."""
    import jsonschema

    schema = json.loads((ROOT / "schema" / "protocol.schema.json").read_text())
    failure = {"$schema": schema["$schema"], "$defs": schema["$defs"], "$ref": "#/$defs/failure"}
    made = [
        engine.compute_raw([{"op": "entropy", "rho": np.array([[np.nan, 0], [0, 1]]), "id": 3}])[0],
        engine.compute_raw([slow_request()], timeout=0.2)[0],
        engine.compute_raw([{"op": "entropy", "rho": 1j}])[0],
    ]
    engine.start()
    wait_until_idle(engine.pid)
    killer = kill_when_busy(engine.pid)
    made.append(engine.compute_raw([slow_request()])[0])
    killer.join()
    codes = [a["error"]["code"] for a in made]
    assert codes == ["invalid-argument", "deadline-exceeded", "invalid-argument", "internal-error"]
    for a in made:
        jsonschema.validate(a, failure, cls=jsonschema.Draft202012Validator)


def test_compute_async_leaves_the_event_loop_free():
    """While an answer is computed the loop keeps running other tasks (asyncio, standard library)."""
    import asyncio

    async def main():
        ticks = 0

        async def ticker():
            nonlocal ticks
            while True:
                ticks += 1
                await asyncio.sleep(0.01)

        t = asyncio.create_task(ticker())
        answers = await rhosigma.compute_async([slow_request(id="s"), {"op": "entropy", "rho": np.eye(2) / 2}])
        t.cancel()
        return answers, ticks

    answers, ticks = asyncio.run(main())
    assert answers[0]["ok"] and answers[0]["id"] == "s" and answers[1]["value"] == 1
    assert ticks >= 20        # the SDP takes well over 0.2 s; the loop ticked all along


def test_a_timeout_reaches_the_engine_as_its_deadline(engine):
    """timeout= becomes the request's "deadline" (milliseconds); an engine at its deadline stops the SDP by
    itself, says how far it got and lives on (docs/protocol.md, common fields: deadline)."""
    from rhosigma.engine import _Prepared, grace

    sent = _Prepared({"op": "entropy", "rho": [[1]]}, 0.25)
    assert json.loads(sent.line)["deadline"] == 250 and sent.wait == 0.25 + grace(0.25)
    own = _Prepared({"op": "entropy", "rho": [[1]], "deadline": 5000}, 0.25)
    assert json.loads(own.line)["deadline"] == 5000 and own.wait == 0.25 + grace(0.25)   # kept; the wait is the timeout's
    assert _Prepared({"op": "entropy", "rho": [[1]], "deadline": 5000}).wait is None       # no timeout: nothing is killed
    engine.start()
    answer = engine.compute(slow_request(id="bounded", deadline=500))
    assert answer["error"]["code"] == "deadline-exceeded" and answer["error"]["path"] == "deadline", answer
    assert answer["error"]["detail"]["deadline"] == 500 and "iterations" in answer["error"]["detail"]
    assert engine.starts == 1                                              # stopped by itself, not killed
