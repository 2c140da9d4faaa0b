"""The one way every reference script calls cvxopt.solvers.sdp: a ladder of tolerances.

cvxopt is asked for the tightest tolerance first. Near the boundary of the cone it may stop with an
arithmetic error (ZeroDivisionError, ArithmeticError, ValueError: which one, and whether at all, depends
on the processor's floating-point details) or with status 'unknown'; then the next looser tolerance is
tried. The tolerance of the accepted solve is recorded in the solution as sol["tolerance"], so that a
reference never depends on the processor it runs on without saying so.

Deliberately not here: building the problems (each script does that from the published formulation).
Cost: at most len(ladder) solves.
"""
import time

from cvxopt import matrix, solvers

LADDER = (1e-10, 1e-9, 1e-8, 1e-7)
NUMERICAL_ERRORS = (ZeroDivisionError, ArithmeticError, ValueError)


def set_tolerance(tol, maxiters=200):
    """cvxopt's absolute, relative and feasibility tolerances all set to `tol`, progress off."""
    solvers.options.update({"show_progress": False, "abstol": tol, "reltol": tol, "feastol": tol, "maxiters": maxiters})


def solve_sdp(c, ladder=LADDER, clock=None, **kwargs):
    """cvxopt.solvers.sdp(c, **kwargs) down the ladder; the first 'optimal' solution, with
    sol["tolerance"] set. With `clock` (a list), the seconds inside solvers.sdp for the accepted
    attempt are appended. Raises RuntimeError naming every failed attempt when none is optimal."""
    if not isinstance(c, type(matrix([0.0]))):
        c = matrix(c)
    attempts = []
    for tol in ladder:
        set_tolerance(tol)
        t0 = time.perf_counter()
        try:
            sol = solvers.sdp(c, **kwargs)
        except NUMERICAL_ERRORS as err:
            attempts.append(f"{tol:g}: {type(err).__name__}")
            continue
        t1 = time.perf_counter()
        if sol["status"] == "optimal":
            sol["tolerance"] = tol
            if clock is not None:
                clock.append(t1 - t0)
            return sol
        attempts.append(f"{tol:g}: status {sol['status']}")
    raise RuntimeError("cvxopt did not reach an optimal solution (" + "; ".join(attempts) + ")")
