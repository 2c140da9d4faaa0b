"""The headless engine: one long-lived `rhosigma serve` process per kernel, spoken to in JSON Lines.

`rhosigma serve` (docs/protocol.md, "The command") writes a ready line, then one answer line per request
line, in order. `Engine` keeps one such process and:
- is thread-safe: one lock around each exchange, so threads of a kernel share the process in turn;
- pipelines batches (a writer thread feeds requests while answers are read, so neither pipe can fill up
  and stall the other side);
- survives a dying process: the request it died on is answered with 'internal-error' (exit status and
  the end of its standard error in `detail`), a new process is started and the rest of the batch is
  sent to it;
- bounds each request with an optional `timeout` (seconds). The request carries it to the engine as
  its "deadline" (milliseconds; the protocol's common field), so iterative methods and the SDP solver
  stop in time with 'deadline-exceeded' and say how far they got. If no answer has come `grace(timeout)`
  later (work the engine cannot interrupt), the whole process group is killed (the engine runs in a
  session of its own, so a wrapper script and the node it started both stop), the request is answered
  with 'deadline-exceeded', and the engine is restarted for what follows. A request's own "deadline"
  is kept (the engine's business); without a timeout nothing is killed, and without either the
  engine's default deadline applies;
- reads and writes UTF-8 bytes itself, whatever the locale;
- raises the package's own `EngineNotFound` / `EngineStartError` when the command cannot start;
- answers a request that cannot be sent (a NaN inside a numpy array) alone, with the protocol's
  'invalid-argument' and the entry's path, without sending it: the rest of the batch is unaffected.

The command (`engine_command`): `$RHOSIGMA_COMMAND` when set (split like a POSIX shell, so quoted paths
with spaces work), else the checkout's `bin/rhosigma.js`, else the single-file bundle shipped in the
wheel (`rhosigma/_bundle/rhosigma.mjs`), both run with `node` from PATH; `serve` is appended.

Deliberately not here: numerics (the engine computes everything) and widget comms. Cost per request: one
JSON encode and decode plus one pipe round trip (bench: kernel-bridge/bench_overhead.py).
"""
from __future__ import annotations

import asyncio
import atexit
import functools
import json
import os
import select
import shlex
import shutil
import signal
import subprocess
import tempfile
import threading
import time
import weakref
from pathlib import Path
from typing import Any, Iterable, Sequence

from .answer import Answer
from .convert import Refusal, dumps_line, to_protocol
from .errors import EngineNotFound, EngineStartError

__all__ = ["Engine", "engine_command", "default_engine", "set_default_engine", "shutdown", "compute", "compute_batch", "compute_async"]

_PACKAGE_DIR = Path(__file__).resolve().parent
#: The launcher of the engine shipped inside the wheel (`npm run build:engine-bundle`: the checkout's
#: bin/rhosigma.js and bundle in the same layout, so it starts with V8's code cache as the checkout does).
BUNDLE_PATH = _PACKAGE_DIR / "_bundle" / "bin" / "rhosigma.js"
#: The checkout's command (kernel-bridge/rhosigma/ → the repository root).
CHECKOUT_BIN = _PACKAGE_DIR.parent.parent / "bin" / "rhosigma.js"

#: Seconds allowed for the engine to print its ready line (Node start-up and module loading).
DEFAULT_START_TIMEOUT = 60.0
_STDERR_TAIL = 4000


def engine_command() -> list[str]:
    """The command that runs the engine, without the `serve` argument (see the module docstring)."""
    env = os.environ.get("RHOSIGMA_COMMAND")
    if env is not None and env.strip():
        try:
            parts = shlex.split(env)
        except ValueError as err:
            raise EngineNotFound(f"$RHOSIGMA_COMMAND cannot be split like a shell command: {err}") from None
        return parts
    for script in (CHECKOUT_BIN, BUNDLE_PATH):
        if script.is_file():
            node = shutil.which("node")
            if node is None:
                raise EngineNotFound(
                    "The rhosigma engine needs Node.js (version 20 or later) on PATH: `node` was not found. "
                    "Install Node.js, or set RHOSIGMA_COMMAND to a command that runs the engine."
                )
            return [node, str(script)]
    raise EngineNotFound(
        f"No rhosigma engine found: neither {CHECKOUT_BIN} (a checkout) nor {BUNDLE_PATH} (an installed wheel) "
        "exists. Reinstall the package, or set RHOSIGMA_COMMAND to a command that runs the engine."
    )


class _Timeout(Exception):
    pass


def _failure(op: Any, request_id: Any, code: str, message: str, *, path: str | None = None, detail: dict | None = None) -> dict:
    error: dict[str, Any] = {"code": code, "message": message}
    if path:
        error["path"] = path
    if detail:
        error["detail"] = detail
    answer: dict[str, Any] = {"ok": False, "op": op if isinstance(op, str) else None}
    if isinstance(request_id, (str, int, float)) and not isinstance(request_id, bool):
        answer["id"] = request_id
    answer["error"] = error
    return answer


#: The protocol's largest "deadline" (milliseconds).
MAX_DEADLINE_MS = 86_400_000


def grace(timeout: float) -> float:
    """Seconds allowed past a request's deadline before its engine is killed: a quarter of it, 1–30 s
    (an SDP stops at its first iteration past the deadline, which on a loaded machine can be late)."""
    return min(max(1.0, 0.25 * timeout), 30.0)


class _Prepared:
    """One request of an exchange: its line to send, or the answer it already has (a local refusal)."""

    __slots__ = ("request", "line", "answer", "wait")

    def __init__(self, request: Any, timeout: float | None = None):
        self.request = request
        self.line: bytes | None = None
        self.answer: dict | None = None
        #: Seconds to wait for the answer before the engine is killed (None: no limit).
        self.wait: float | None = None
        op = request.get("op") if isinstance(request, dict) else None
        request_id = request.get("id") if isinstance(request, dict) else None
        try:
            data = to_protocol(request)
            if timeout is not None:
                if isinstance(data, dict) and "deadline" not in data:
                    data["deadline"] = min(max(1, round(timeout * 1000)), MAX_DEADLINE_MS)
                self.wait = timeout + grace(timeout)
            self.line = dumps_line(data)
        except Refusal as refusal:
            self.answer = _failure(op, request_id, refusal.code, refusal.message, path=refusal.path)
        except (TypeError, ValueError) as err:
            self.answer = _failure(op, request_id, "invalid-argument", f"The request cannot be written as JSON: {err}.")


class Engine:
    """One `rhosigma serve` process, started on first use (or by `start()`), restarted when it dies.

    >>> with Engine() as engine:                                   # doctest: +SKIP
    ...     engine.compute({"op": "entropy", "rho": [[0.5, 0], [0, 0.5]]})["value"]
    1
    """

    def __init__(self, command: Sequence[str] | str | None = None, *, start_timeout: float = DEFAULT_START_TIMEOUT, env: dict | None = None):
        if isinstance(command, str):
            command = shlex.split(command)
        self._command = list(command) if command is not None else None
        self.start_timeout = start_timeout
        self._env = env
        self._lock = threading.RLock()
        self._proc: subprocess.Popen | None = None
        self._stderr: Any = None
        self._buffer = bytearray()
        self._scanned = 0
        self._owner = os.getpid()
        #: The ready line of the running process ({"ready", "engine", "version", "protocol"}).
        self.ready: dict | None = None
        #: How many times the process was started (1 after the first start).
        self.starts = 0
        _live_engines.add(self)

    # -- process management ------------------------------------------------------------------------

    @property
    def command(self) -> list[str]:
        """The command line run (with `serve` appended when started)."""
        return list(self._command) if self._command is not None else engine_command()

    @property
    def pid(self) -> int | None:
        """The process id of the running engine (also its process group id), or None."""
        proc = self._proc
        return proc.pid if proc is not None and proc.poll() is None else None

    def start(self) -> dict:
        """Start the process if it is not running; returns its ready line."""
        with self._lock:
            self._ensure()
            assert self.ready is not None
            return dict(self.ready)

    def _ensure(self) -> None:
        if self._owner != os.getpid():
            # A forked child must not share the parent's pipes: it gets a process of its own.
            self._proc, self._stderr, self._owner = None, None, os.getpid()
        if self._proc is not None and self._proc.poll() is None:
            return
        self._discard()
        self._spawn()

    def _spawn(self) -> None:
        command = self.command + ["serve"]
        self._stderr = tempfile.TemporaryFile()
        try:
            self._proc = subprocess.Popen(
                command,
                stdin=subprocess.PIPE,
                stdout=subprocess.PIPE,
                stderr=self._stderr,
                bufsize=0,
                start_new_session=True,
                env=self._env,
                close_fds=True,
            )
        except (FileNotFoundError, PermissionError, NotADirectoryError) as err:
            self._proc = None
            raise EngineNotFound(f"Cannot run the rhosigma engine {shlex.join(command)}: {err.strerror or err}.") from None
        self._buffer.clear()
        self._scanned = 0
        self.starts += 1
        try:
            line = self._readline(time.monotonic() + self.start_timeout)
        except _Timeout:
            self._kill()
            raise EngineStartError(
                f"The rhosigma engine printed no ready line within {self.start_timeout:g} s: {shlex.join(command)}",
                command=command, stderr=self._stderr_tail(),
            ) from None
        if line is None:
            code = self._reap()
            raise EngineStartError(
                f"The rhosigma engine exited ({_describe_exit(code)}) before it was ready: {shlex.join(command)}",
                command=command, returncode=code, stderr=self._stderr_tail(),
            )
        try:
            ready = json.loads(line.decode("utf-8"))
        except (UnicodeDecodeError, ValueError):
            ready = None
        if not (isinstance(ready, dict) and ready.get("ready") is True and ready.get("engine") == "rhosigma"
                and str(ready.get("protocol", "")).split(".")[0] == "1"):
            self._kill()
            shown = line[:200].decode("utf-8", "replace")
            raise EngineStartError(
                f"The command did not start a rhosigma engine speaking protocol 1 (first line: {shown!r}): {shlex.join(command)}",
                command=command, stderr=self._stderr_tail(),
            )
        self.ready = ready

    def _stderr_tail(self) -> str:
        f = self._stderr
        if f is None:
            return ""
        try:
            size = f.seek(0, os.SEEK_END)
            f.seek(max(0, size - _STDERR_TAIL))
            return f.read().decode("utf-8", "replace")
        except (OSError, ValueError):
            return ""

    def _reap(self, wait: float = 5.0) -> int | None:
        proc = self._proc
        if proc is None:
            return None
        try:
            return proc.wait(wait)
        except subprocess.TimeoutExpired:
            self._kill()
            return proc.returncode

    def _kill(self) -> None:
        """Stop the whole process group (the engine and anything a wrapper started), then reap it."""
        proc = self._proc
        if proc is None:
            return
        try:
            os.killpg(proc.pid, signal.SIGKILL)
        except (ProcessLookupError, PermissionError):
            pass
        try:
            proc.kill()
        except OSError:
            pass
        try:
            proc.wait(10)
        except subprocess.TimeoutExpired:  # pragma: no cover - SIGKILL not delivered
            pass

    def _discard(self) -> None:
        proc = self._proc
        if proc is not None:
            self._kill()
            for pipe in (proc.stdin, proc.stdout):
                try:
                    if pipe:
                        pipe.close()
                except OSError:
                    pass
        if self._stderr is not None:
            try:
                self._stderr.close()
            except OSError:
                pass
        self._proc, self._stderr, self.ready = None, None, None

    def close(self) -> None:
        """End the process: standard input is closed (the engine exits with 0); killed if it lingers."""
        with self._lock:
            proc = self._proc
            if proc is None or self._owner != os.getpid():
                self._proc = None
                return
            try:
                if proc.stdin:
                    proc.stdin.close()
                proc.wait(2)
            except (OSError, subprocess.TimeoutExpired):
                pass
            self._discard()

    def __enter__(self) -> "Engine":
        return self

    def __exit__(self, *exc: Any) -> None:
        self.close()

    def __repr__(self) -> str:
        state = f"pid {self.pid}" if self.pid else "not running"
        version = f", engine {self.ready.get('version')}" if self.ready else ""
        return f"<rhosigma.Engine {state}{version}, started {self.starts}×: {shlex.join(self.command)} serve>"

    # -- reading and writing -----------------------------------------------------------------------

    def _readline(self, deadline: float | None) -> bytes | None:
        """The next line from the engine (without its newline), None at end of output; may raise _Timeout."""
        assert self._proc is not None and self._proc.stdout is not None
        fd = self._proc.stdout.fileno()
        while True:
            i = self._buffer.find(b"\n", self._scanned)
            if i >= 0:
                line = bytes(self._buffer[:i])
                del self._buffer[: i + 1]
                self._scanned = 0
                return line
            self._scanned = len(self._buffer)
            if deadline is not None:
                remaining = deadline - time.monotonic()
                if remaining <= 0:
                    raise _Timeout
                ready, _, _ = select.select([fd], [], [], remaining)
                if not ready:
                    raise _Timeout
            chunk = os.read(fd, 1 << 20)
            if not chunk:
                return None
            self._buffer += chunk

    def _write(self, data: bytes) -> bool:
        """Write everything; False when the engine has gone (its input pipe is closed)."""
        assert self._proc is not None and self._proc.stdin is not None
        fd = self._proc.stdin.fileno()
        view = memoryview(data)
        try:
            while view:
                n = os.write(fd, view)
                view = view[n:]
        except (BrokenPipeError, OSError):
            return False
        return True

    # -- exchanges ---------------------------------------------------------------------------------

    def _exchange(self, prepared: list[_Prepared]) -> None:
        """Fill in `answer` for every prepared request, restarting the engine as often as needed."""
        pending = [p for p in prepared if p.answer is None]
        while pending:
            self._ensure()
            proc = self._proc
            lines = [p.line for p in pending]
            writer: threading.Thread | None = None
            done = 0
            try:
                if len(lines) == 1:
                    self._write(lines[0])  # a lone request: the engine writes nothing before reading it all
                else:
                    writer = threading.Thread(target=self._write, args=(b"".join(lines),), daemon=True)
                    writer.start()
                for p in pending:
                    deadline = time.monotonic() + p.wait if p.wait is not None else None
                    try:
                        line = self._readline(deadline)
                    except _Timeout:
                        self._kill()
                        p.answer = _failure(
                            _op(p.request), _id(p.request), "deadline-exceeded",
                            f"No answer within {p.wait:.3g} s (the deadline and its grace); the engine process (with its "
                            "process group) was stopped and is restarted for the next request.",
                            detail={"waited": p.wait},
                        )
                        done += 1
                        break
                    if line is None:
                        code = self._reap()
                        p.answer = _failure(
                            _op(p.request), _id(p.request), "internal-error",
                            f"The engine process exited ({_describe_exit(code)}) while answering this request; "
                            "it is restarted for the next request.",
                            detail={"exit": _describe_exit(code), "stderr": self._stderr_tail()[-1000:]},
                        )
                        done += 1
                        break
                    try:
                        p.answer = json.loads(line.decode("utf-8"))
                        if not isinstance(p.answer, dict) or "ok" not in p.answer:
                            raise ValueError("not an answer")
                    except (UnicodeDecodeError, ValueError):
                        self._kill()
                        p.answer = _failure(
                            _op(p.request), _id(p.request), "internal-error",
                            "The engine wrote a line that is not an answer; it was stopped and is restarted.",
                            detail={"line": line[:200].decode("utf-8", "replace")},
                        )
                        done += 1
                        break
                    done += 1
            finally:
                if proc is not None and proc.poll() is None and done < len(pending):
                    # Interrupted (KeyboardInterrupt, a kernel interrupt) with answers still owed: a late
                    # answer would be taken for the next request's, so this process is stopped and the
                    # next request starts a new one.
                    self._kill()
                if writer is not None:
                    writer.join()
            pending = pending[done:]

    def compute(self, request: Any, *, timeout: float | None = None) -> Answer:
        """The answer to one request (a dict, numpy arrays welcome): an `Answer`, never an exception."""
        return self.compute_batch([request], timeout=timeout)[0]

    def compute_batch(self, requests: Iterable[Any], *, timeout: float | None = None) -> list[Answer]:
        """Answers to many requests, in order; each failure is confined to its own answer.

        `timeout` bounds each request separately (seconds from when the engine could start on it): it
        becomes the request's "deadline", and the engine is killed `grace(timeout)` after it.
        """
        prepared = [_Prepared(r, timeout) for r in requests]
        with self._lock:
            self._exchange(prepared)
        return [Answer.from_protocol(p.answer, p.request) for p in prepared]

    def compute_raw(self, requests: Iterable[Any], *, timeout: float | None = None) -> list[dict]:
        """The answers exactly as the engine wrote them (JSON data, "Infinity" still a string)."""
        prepared = [_Prepared(r, timeout) for r in requests]
        with self._lock:
            self._exchange(prepared)
        return [p.answer for p in prepared]  # type: ignore[misc]


def _op(request: Any) -> Any:
    return request.get("op") if isinstance(request, dict) else None


def _id(request: Any) -> Any:
    return request.get("id") if isinstance(request, dict) else None


def _describe_exit(code: int | None) -> str:
    if code is None:
        return "still running"
    if code < 0:
        try:
            return f"killed by {signal.Signals(-code).name}"
        except ValueError:
            return f"killed by signal {-code}"
    return f"exit code {code}"


# -- the kernel's engine ---------------------------------------------------------------------------

_live_engines: "weakref.WeakSet[Engine]" = weakref.WeakSet()
_default: Engine | None = None
_default_lock = threading.Lock()


def default_engine() -> Engine:
    """The engine of this process (kernel), created on first use."""
    global _default
    with _default_lock:
        if _default is None:
            _default = Engine()
        return _default


def set_default_engine(engine: Engine | None) -> Engine | None:
    """Replace the process's engine (None: a fresh one on next use); returns the previous one (not closed)."""
    global _default
    with _default_lock:
        previous, _default = _default, engine
        return previous


def shutdown() -> None:
    """Close every engine this process started."""
    for engine in list(_live_engines):
        engine.close()


atexit.register(shutdown)


def compute(request: Any, *, timeout: float | None = None) -> Any:
    """Answer one request (a dict) or a batch (a list of dicts) through the kernel's engine.

    Returns an `Answer` (a dict: {"ok": True, "op", "value", ...} or {"ok": False, "op", "error"}) or a
    list of them, in order. Refusals are answers, not exceptions; `Answer.raise_for_error()` raises.
    Numeric "Infinity" becomes float('inf'); ids, labels and reasons stay strings.
    """
    if isinstance(request, (list, tuple)):
        return default_engine().compute_batch(request, timeout=timeout)
    return default_engine().compute(request, timeout=timeout)


def compute_batch(requests: Iterable[Any], *, timeout: float | None = None) -> list[Answer]:
    """Answers to many requests through the kernel's engine, in order (see `compute`)."""
    return default_engine().compute_batch(requests, timeout=timeout)


async def compute_async(request: Any, *, timeout: float | None = None, engine: Engine | None = None) -> Any:
    """`compute` without blocking an asyncio loop (a kernel's message loop, a widget's callback): the
    exchange runs in a worker thread of the loop's default executor; the engine's lock keeps order."""
    target = engine or default_engine()
    call = target.compute_batch if isinstance(request, (list, tuple)) else target.compute
    loop = asyncio.get_running_loop()
    return await loop.run_in_executor(None, functools.partial(call, request, timeout=timeout))
