"""Sweeps from Python: `rhosigma.sweep(spec)` returns the rows of a sweep as a pandas DataFrame.

The spec is the one `rhosigma sweep SPEC` reads (docs/sweeps.md), as a dict or a path to a JSON file.
Every point is computed by the engine through the op `sweep-points` (plain data in, the point's line out),
so a row holds exactly what the command writes on that point's line, whatever runs it:

- without `client`: the package's long-lived engine (`rhosigma serve`), in chunks of `chunk` points;
- with a `dask.distributed` client: the points are split into `shards` (default: one per Dask worker) as
  `rhosigma sweep --shard k/N` splits them (index ≡ k mod N); each task runs on a Dask worker through that
  worker process's own long-lived engine, and the shards are joined by index, as `rhosigma sweep merge`.

Modes as in the command: "first-violation" keeps the points up to the first violating index; "search"
then refines the points with the smallest gaps (one request per refinement; with a client, one task each).

The DataFrame: one row per point (then per refinement), columns `index`, `sample`, one per parameter,
`value`, `left`, `right`, `gap`, `violated`, `refined` (the rank, for refinement rows), `failed_at`,
`error_code`, `error` (for failure lines: they are kept, never dropped), `recorded`, `reproduce` (the
requests that reproduce a violation); `df.attrs` holds the spec hash, the seed, the engine version and
the mode. Infinite values are floats (the protocol's "Infinity" strings are converted).

Deliberately not here: any numerics (the engine computes every point) and files (the command writes the
resumable JSON Lines). Cost: one engine request per chunk; with Dask, one task per shard.
"""
from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any, Callable, Iterable

from .errors import ComputeError

__all__ = ["sweep", "sweep_rows", "rows_to_frame"]

DEFAULT_CHUNK = 256


def _read_spec(spec: Any) -> dict:
    if isinstance(spec, (str, Path)):
        with open(spec, encoding="utf-8") as f:
            return json.load(f)
    if not isinstance(spec, dict):
        raise TypeError(f"a sweep spec is a dict or the path of a JSON file, not {type(spec).__name__}")
    return spec


def _ask(engine: Any, spec: dict, *, indices: list[int] | None = None, refine: list[list[int]] | None = None) -> dict:
    request: dict[str, Any] = {"op": "sweep-points", "spec": spec}
    if indices is not None:
        request["indices"] = indices
    if refine is not None:
        request["refine"] = refine
    answer = engine.compute(request)
    if not answer.get("ok"):
        raise ComputeError(dict(answer), request)
    return dict(answer)


def _engine(engine: Any) -> Any:
    if engine is not None:
        return engine
    from .engine import default_engine

    return default_engine()


def _shard_rows(spec: dict, shard: int, count: int, chunk: int, engine: Any = None) -> list[dict]:
    """The lines of shard `shard` of `count` (indices ≡ shard mod count), in index order.

    In first-violation mode the shard stops after its first violation, as `rhosigma sweep --shard` does.
    Runs wherever it is called: in the kernel, or inside a Dask task (that worker process's own engine).
    """
    eng = _engine(engine)
    info = _ask(eng, spec, indices=[])
    total, mode = info["points"], info["mode"]
    rows: list[dict] = []
    indices = list(range(shard, total, count))
    for start in range(0, len(indices), chunk):
        lines = _ask(eng, spec, indices=indices[start:start + chunk])["value"]
        for line in lines:
            rows.append(line)
            if mode == "first-violation" and line.get("violated") is True:
                return rows
    return rows


def _refine_rows(spec: dict, jobs: list[list[int]], engine: Any = None) -> list[dict]:
    return _ask(_engine(engine), spec, refine=jobs)["value"]


def _candidates(rows: Iterable[dict], count: int) -> list[int]:
    """The points with the smallest finite gaps, ties by index (as src/sweep/runner.ts chooses them)."""
    scored = []
    for r in rows:
        g = r.get("gap")
        if r.get("failed") is None and isinstance(g, (int, float)) and not isinstance(g, bool) and math.isfinite(g):
            scored.append((g, r["index"]))
    scored.sort()
    return [i for _, i in scored[:count]]


def _merge(shards: list[list[dict]], mode: str) -> list[dict]:
    """Shard rows joined by index; first-violation: up to the smallest violating index of any shard."""
    rows = sorted((r for s in shards for r in s), key=lambda r: r["index"])
    if mode == "first-violation":
        first = next((r["index"] for r in rows if r.get("violated") is True), None)
        if first is not None:
            rows = [r for r in rows if r["index"] <= first]
    return rows


def sweep_rows(spec: Any, *, client: Any = None, shards: int | None = None, chunk: int = DEFAULT_CHUNK, engine: Any = None,
               progress: Callable[[int, int], None] | None = None) -> tuple[list[dict], dict]:
    """The sweep's lines as dicts (points, then refinements) and its header facts; see `sweep`."""
    spec = _read_spec(spec)
    if chunk < 1:
        raise ValueError("chunk must be at least 1")
    search = spec.get("mode")
    refine_count = search["search"].get("refine", 5) if isinstance(search, dict) and "search" in search else 0
    if client is None:
        eng = _engine(engine)
        info = _ask(eng, spec, indices=[])
        total, mode = info["points"], info["mode"]
        rows: list[dict] = []
        for start in range(0, total, chunk):
            lines = _ask(eng, spec, indices=list(range(start, min(total, start + chunk))))["value"]
            stop = False
            for line in lines:
                rows.append(line)
                if mode == "first-violation" and line.get("violated") is True:
                    stop = True
                    break
            if progress:
                progress(len(rows), total)
            if stop:
                break
        if refine_count:
            jobs = [[i, rank] for rank, i in enumerate(_candidates(rows, refine_count))]
            for job in jobs:
                rows.extend(_refine_rows(spec, [job], eng))
                if progress:
                    progress(len(rows), total + len(jobs))
    else:
        info = client.submit(_header, spec, pure=False).result()
        total, mode = info["points"], info["mode"]
        n = shards or max(1, len(client.scheduler_info().get("workers", {})))
        futures = [client.submit(_shard_rows, spec, k, n, chunk, pure=False) for k in range(n)]
        rows = _merge(client.gather(futures), mode)
        if refine_count:
            jobs = [[i, rank] for rank, i in enumerate(_candidates(rows, refine_count))]
            refined = client.gather([client.submit(_refine_rows, spec, [job], pure=False) for job in jobs])
            rows.extend(r for part in refined for r in part)
    facts = {"specHash": info["specHash"], "seed": spec.get("seed"), "engine": info["engine"]["version"], "mode": mode, "points": total}
    return rows, facts


def _header(spec: dict) -> dict:
    return _ask(_engine(None), spec, indices=[])


def _number(v: Any) -> Any:
    if v == "Infinity":
        return math.inf
    if v == "-Infinity":
        return -math.inf
    return v


def rows_to_frame(rows: list[dict], facts: dict, parameters: Iterable[str] = ()):
    """A pandas DataFrame of sweep lines (see `sweep` for the columns)."""
    import pandas as pd

    names = list(parameters)
    records = []
    for r in rows:
        rec: dict[str, Any] = {"index": r["index"], "sample": r.get("sample")}
        for n in names:
            rec[n] = r.get("parameters", {}).get(n)
        failed = r.get("failed")
        rec["value"] = _number(r.get("value"))
        rec["left"] = _number(r.get("left"))
        rec["right"] = _number(r.get("right"))
        rec["gap"] = _number(r.get("gap"))
        rec["violated"] = r.get("violated")
        rec["refined"] = r.get("refined")
        rec["failed_at"] = failed.get("at") if failed else None
        rec["error_code"] = failed["error"].get("code") if failed else None
        rec["error"] = failed["error"].get("message") if failed else None
        rec["recorded"] = r.get("recorded")
        rec["reproduce"] = r.get("reproduce")
        records.append(rec)
    df = pd.DataFrame.from_records(records, columns=["index", "sample", *names, "value", "left", "right", "gap", "violated", "refined",
                                                      "failed_at", "error_code", "error", "recorded", "reproduce"])
    df.attrs.update(facts)
    return df


def sweep(spec: Any, *, client: Any = None, shards: int | None = None, chunk: int = DEFAULT_CHUNK, engine: Any = None,
          progress: Callable[[int, int], None] | None = None):
    """Run a sweep spec and return its rows as a pandas DataFrame.

    `spec`: a dict or the path of a JSON file (docs/sweeps.md). `client`: a `dask.distributed.Client` to hand
    the shards to (default: this kernel's engine). `shards`: how many (default: one per Dask worker).
    `chunk`: points per engine request. `engine`: an `rhosigma.Engine` to use instead of the default one.
    `progress(done, total)`: called after each chunk (without a client).

    A refused spec raises `ComputeError` with the field at fault in `path` ("spec.parameters.alpha"). A point
    whose op fails is a row with `error_code` and `error` set. The rows equal the lines `rhosigma sweep` writes.
    """
    spec = _read_spec(spec)
    rows, facts = sweep_rows(spec, client=client, shards=shards, chunk=chunk, engine=engine, progress=progress)
    return rows_to_frame(rows, facts, (spec.get("parameters") or {}).keys())
