"""Shared by the cvxopt reference scripts: the real embedding of complex matrices and the real
coordinates of Hermitian matrices (in the order of rhosigma's matrixCoordinates: for each i <= j, the
diagonal entry, or the real part then the imaginary part of entry (i, j)). cvxopt works over the reals,
so complex PSD blocks enter it through this embedding; the embedding preserves positivity."""
import numpy as np


def embed(h):
    """The real embedding [[Re H, -Im H], [Im H, Re H]] of a complex matrix."""
    return np.block([[h.real, -h.imag], [h.imag, h.real]])


def hermitian_basis(d):
    """Hermitian B_c with H = sum_c x_c B_c, x the real coordinates of H."""
    out = []
    for i in range(d):
        for j in range(i, d):
            e = np.zeros((d, d), dtype=complex)
            if i == j:
                e[i, i] = 1
                out.append(e)
                continue
            e[i, j] = e[j, i] = 1
            out.append(e)
            f = np.zeros((d, d), dtype=complex)
            f[i, j] = 1j
            f[j, i] = -1j
            out.append(f)
    return out
