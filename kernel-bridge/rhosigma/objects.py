"""`State` and `Channel`: numpy-backed holders of the protocol's state and channel forms.

A `State` is a density matrix or a ket with subsystem `dims` and optional `labels`; a `Channel` is a
list of Kraus operators or a Choi matrix with the input dims `from_dims` and output dims `to_dims`
(the protocol's "from" and "to"). Both convert to the protocol (`to_protocol()`, also used whenever one
is put into a request) and back (`from_protocol`), check their shapes on construction (square matrix,
dims multiplying to the size, one label per subsystem), and have a readable `repr`.

Everything numerical is asked of the engine: `State.spectrum()`, `State.checks()`, `Channel.checks()`,
`Channel.to_choi()`, the presets. Construction never validates Hermiticity or positivity (the engine
refuses bad states when they are used, with the path of the fault) and never repairs anything.
Rich notebook display (matrix, spectrum, checks) is in rhosigma.display (`%load_ext rhosigma`).
Cost: construction copies the arrays once; the engine calls cost one request each.
"""
from __future__ import annotations

from typing import Any, Sequence

import numpy as np

from .convert import to_numpy

__all__ = ["State", "Channel"]


def _as_matrix(m: Any, what: str) -> np.ndarray:
    if isinstance(m, dict):
        m = to_numpy(m)
    a = np.array(m)
    if a.dtype.kind not in "biufc":
        raise TypeError(f"{what} must hold numbers, not {a.dtype}")
    a = a.astype(complex if a.dtype.kind == "c" else float)
    if a.ndim != 2:
        raise ValueError(f"{what} must be a 2-D matrix, not of shape {a.shape}")
    return a


def _dims(dims: Sequence[int] | None, size: int, what: str) -> list[int]:
    if dims is None:
        return [size]
    out = [int(d) for d in dims]
    if not out or any(d < 1 for d in out):
        raise ValueError(f"{what}: dims must be positive integers, not {list(dims)}")
    if int(np.prod(out)) != size:
        raise ValueError(f"{what}: dims {out} multiply to {int(np.prod(out))}, not to the size {size}")
    return out


def _fmt(a: np.ndarray) -> str:
    return np.array2string(a, precision=4, suppress_small=True, max_line_width=100, threshold=64)


class State:
    """A quantum state: `State(matrix, dims=[2, 2], labels=["A", "B"])` or `State(ket=psi, dims=...)`.

    `matrix` is the density matrix (for a ket, |ψ⟩⟨ψ|); `ket` the amplitudes when given as a ket.
    """

    def __init__(self, matrix: Any = None, *, ket: Any = None, dims: Sequence[int] | None = None, labels: Sequence[str] | None = None):
        if (matrix is None) == (ket is None):
            raise ValueError("State needs exactly one of a matrix or a ket")
        if ket is not None:
            k = np.array(to_numpy(ket) if isinstance(ket, dict) else ket)
            if k.ndim != 1 or k.dtype.kind not in "biufc":
                raise ValueError(f"a ket is a 1-D array of numbers, not of shape {k.shape}")
            self.ket: np.ndarray | None = k.astype(complex if k.dtype.kind == "c" else float)
            size = self.ket.shape[0]
        else:
            self.ket = None
            m = _as_matrix(matrix, "a state's matrix")
            if m.shape[0] != m.shape[1]:
                raise ValueError(f"a state's matrix must be square, not {m.shape[0]}×{m.shape[1]}")
            self._matrix = m
            size = m.shape[0]
        self.dims = _dims(dims, size, "State")
        if labels is not None:
            labels = [str(x) for x in labels]
            if len(labels) != len(self.dims) or len(set(labels)) != len(labels):
                raise ValueError(f"labels must be distinct, one per subsystem ({len(self.dims)}), not {labels}")
        self.labels: list[str] | None = labels

    @property
    def matrix(self) -> np.ndarray:
        """The density matrix (|ψ⟩⟨ψ| for a ket)."""
        if self.ket is not None:
            return np.outer(self.ket, self.ket.conj())
        return self._matrix

    @property
    def size(self) -> int:
        return int(np.prod(self.dims))

    @classmethod
    def from_protocol(cls, data: Any) -> "State":
        """From the protocol's form: a bare matrix, {"matrix", "dims"?, "labels"?} or {"ket", ...}."""
        if isinstance(data, State):
            return data
        if isinstance(data, dict) and ("matrix" in data or "ket" in data):
            if "ket" in data:
                return cls(ket=data["ket"], dims=data.get("dims"), labels=data.get("labels"))
            return cls(data["matrix"], dims=data.get("dims"), labels=data.get("labels"))
        return cls(data)

    def to_protocol(self) -> dict:
        out: dict[str, Any] = {"ket": self.ket} if self.ket is not None else {"matrix": self._matrix}
        out["dims"] = list(self.dims)
        if self.labels is not None:
            out["labels"] = list(self.labels)
        return out

    @classmethod
    def preset(cls, name: str, **params: Any) -> "State":
        """A named state from the engine (op state-preset): `State.preset("werner", d=2, p=0.25)`."""
        from .functions import state_preset

        return state_preset(name, **params)

    def spectrum(self) -> np.ndarray:
        """Eigenvalues in ascending order (the engine's eigensolver)."""
        from .functions import spectrum

        return spectrum(self.matrix)

    def checks(self, tolerance: float | None = None) -> dict:
        """The engine's view of the state: spectrum, Hermiticity defect, smallest eigenvalue, trace,
        and whether it is a valid state at `tolerance` (the protocol's default 1e-9 when None)."""
        from .functions import _checks_of_state

        return _checks_of_state(self, tolerance)

    def __array__(self, dtype=None, copy=None):
        m = self.matrix
        return m.astype(dtype) if dtype is not None else m

    def __repr__(self) -> str:
        head = f"State(dims={self.dims}"
        if self.labels is not None:
            head += f", labels={self.labels}"
        if self.ket is not None:
            return f"{head}, ket=\n{_fmt(self.ket)})"
        return f"{head}, matrix=\n{_fmt(self._matrix)})"


class Channel:
    """A quantum channel: `Channel(kraus=[K0, K1], from_dims=[2], to_dims=[2])` or `Channel(choi=J, from_dims=[2])`.

    Kraus operators share one shape prod(to_dims) × prod(from_dims); the Choi matrix follows the
    protocol's convention J = Σ_ij |i⟩⟨j| ⊗ N(|i⟩⟨j|), input factor first, unnormalised.
    """

    def __init__(self, kraus: Sequence[Any] | None = None, *, choi: Any = None, from_dims: Sequence[int] | None = None, to_dims: Sequence[int] | None = None):
        if (kraus is None) == (choi is None):
            raise ValueError("Channel needs exactly one of kraus=[...] or choi=J")
        if kraus is not None:
            ops = [_as_matrix(k, "a Kraus operator") for k in (kraus if not isinstance(kraus, np.ndarray) or kraus.ndim == 3 else [kraus])]
            if not ops:
                raise ValueError("a channel needs at least one Kraus operator")
            shape = ops[0].shape
            if any(k.shape != shape for k in ops):
                raise ValueError(f"Kraus operators must share one shape; got {sorted({k.shape for k in ops})}")
            self.kraus: list[np.ndarray] | None = ops
            self.choi: np.ndarray | None = None
            self.from_dims = _dims(from_dims, shape[1], "Channel input")
            self.to_dims = _dims(to_dims, shape[0], "Channel output")
        else:
            j = _as_matrix(choi, "a Choi matrix")
            if j.shape[0] != j.shape[1]:
                raise ValueError(f"a Choi matrix must be square, not {j.shape[0]}×{j.shape[1]}")
            if from_dims is None and to_dims is None:
                raise ValueError("a Choi matrix needs from_dims or to_dims (the other follows from its size)")
            n = j.shape[0]
            if from_dims is not None:
                d_in = int(np.prod(from_dims))
                if n % d_in:
                    raise ValueError(f"the Choi matrix's size {n} is not a multiple of the input dimension {d_in}")
                self.from_dims = _dims(from_dims, d_in, "Channel input")
                self.to_dims = _dims(to_dims, n // d_in, "Channel output")
            else:
                d_out = int(np.prod(to_dims))  # type: ignore[arg-type]
                if n % d_out:
                    raise ValueError(f"the Choi matrix's size {n} is not a multiple of the output dimension {d_out}")
                self.to_dims = _dims(to_dims, d_out, "Channel output")
                self.from_dims = [n // d_out]
            if int(np.prod(self.from_dims)) * int(np.prod(self.to_dims)) != n:
                raise ValueError(f"from_dims {self.from_dims} and to_dims {self.to_dims} do not fit a Choi matrix of size {n}")
            self.kraus = None
            self.choi = j

    @classmethod
    def from_protocol(cls, data: Any) -> "Channel":
        """From the protocol's form {"kraus": [...]} or {"choi": J} with "from" and "to"."""
        if isinstance(data, Channel):
            return data
        if "kraus" in data:
            return cls(kraus=[to_numpy(k) if isinstance(k, dict) else k for k in data["kraus"]], from_dims=data.get("from"), to_dims=data.get("to"))
        return cls(choi=data["choi"], from_dims=data.get("from"), to_dims=data.get("to"))

    def to_protocol(self) -> dict:
        if self.kraus is not None:
            return {"kraus": list(self.kraus), "from": list(self.from_dims), "to": list(self.to_dims)}
        return {"choi": self.choi, "from": list(self.from_dims), "to": list(self.to_dims)}

    @classmethod
    def preset(cls, name: str, **params: Any) -> "Channel":
        """A named channel from the engine (op channel-preset): `Channel.preset("depolarizing", d=2, p=0.1)`."""
        from .functions import channel_preset

        return channel_preset(name, **params)

    def checks(self, tolerance: float | None = None) -> dict:
        """Complete positivity, trace preservation and unitality with the size of each violation (op channel-check)."""
        from .functions import channel_check

        return channel_check(self, tolerance=tolerance)

    def to_choi(self) -> "Channel":
        """The same channel as a Choi matrix (op channel-convert)."""
        from .functions import channel_convert

        return channel_convert(self, "choi")

    def to_kraus(self, minimal: bool = False) -> "Channel":
        """The same channel as Kraus operators (op channel-convert; minimal from the Choi matrix)."""
        from .functions import channel_convert

        return channel_convert(self, "kraus", minimal=minimal)

    def __repr__(self) -> str:
        head = f"Channel(from_dims={self.from_dims}, to_dims={self.to_dims}"
        if self.kraus is not None:
            body = ",\n".join(_fmt(k) for k in self.kraus[:4])
            more = f",\n... {len(self.kraus) - 4} more" if len(self.kraus) > 4 else ""
            return f"{head}, {len(self.kraus)} Kraus operator{'s' if len(self.kraus) != 1 else ''}=\n{body}{more})"
        return f"{head}, choi=\n{_fmt(self.choi)})"  # type: ignore[arg-type]
