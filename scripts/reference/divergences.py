#!/usr/bin/env python3
"""Reference values of quantum divergences, computed independently with numpy/scipy.

Reads JSON from stdin: {"cases": [{"rho": {"re": rows, "im": rows}, "sigma": {...},
"family": "umegaki"|"petz"|"sandwiched"|"alpha-z"|"geometric"|"belavkin-staszewski", "alpha": a, "z": z}]}
and writes {"numpy": version, "scipy": version, "values": [natural-log values]} to stdout.

Textbook formulas, evaluated with scipy.linalg.fractional_matrix_power and scipy.linalg.logm on
full-rank inputs (no support handling here: callers pass positive definite matrices).
Used by test/quantities/divergence-reference.test.ts.
"""
import json
import sys

import numpy as np
import scipy
from scipy.linalg import fractional_matrix_power as fmp, logm


def herm(a):
    return 0.5 * (a + a.conj().T)


def mat(d):
    return np.array(d["re"], dtype=float) + 1j * np.array(d["im"], dtype=float)


def value(case):
    rho, sigma = mat(case["rho"]), mat(case["sigma"])
    fam = case["family"]
    a = case.get("alpha")
    if fam == "umegaki":
        return np.trace(rho @ (logm(rho) - logm(sigma))).real
    if fam == "belavkin-staszewski":
        r = fmp(rho, 0.5)
        return np.trace(rho @ logm(herm(r @ np.linalg.inv(sigma) @ r))).real
    if fam == "petz":
        q = np.trace(fmp(rho, a) @ fmp(sigma, 1 - a)).real
    elif fam == "sandwiched":
        s = fmp(sigma, (1 - a) / (2 * a))
        q = np.trace(fmp(herm(s @ rho @ s), a)).real
    elif fam == "alpha-z":
        z = case["z"]
        s = fmp(sigma, (1 - a) / (2 * z))
        q = np.trace(fmp(herm(s @ fmp(rho, a / z) @ s), z)).real
    elif fam == "geometric":
        s = fmp(sigma, 0.5)
        si = np.linalg.inv(s)
        q = np.trace(s @ fmp(herm(si @ rho @ si), a) @ s).real
    else:
        raise ValueError(fam)
    return np.log(q) / (a - 1)


def main():
    req = json.load(sys.stdin)
    out = {"numpy": np.__version__, "scipy": scipy.__version__, "values": [float(value(c)) for c in req["cases"]]}
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
