"""Reference computations for the simulator tests (library: numpy / scipy from Debian).

Reads one JSON request on stdin: {"cases": [{"op": ..., ...}, ...]} and prints {"results": [...]}.
One process per test file (scipy import is slow), every case in one call.

ops
  eig        {"A"}                        -> eigenvalues (re, im) and right eigenvectors (numpy.linalg.eig)
  expm       {"A"}                        -> scipy.linalg.expm(A)
  vanloan    {"A", "Q", "T"}              -> Phi = expm(A T) and Qd = P - Phi P Phi^T, P from
                                             scipy.linalg.solve_continuous_lyapunov(A, -Q) (A stable)
  variance   {"A", "BWB", "c": [rows]}    -> stationary variance of c x for dx = A x dt + dw,
                                             Cov(dw) = BWB dt, by eigen-decomposition (modes with
                                             |lambda| < 1e-9 must not be seen by c; they are skipped)
  forced     {"A", "b", "c": [rows], "d": [[re, im] per row], "w"} -> complex gain c (jwI - A)^-1 b + d
"""
import json
import sys

import numpy as np
import scipy.linalg as sl


def eig(case):
    A = np.array(case["A"], dtype=float)
    w, v = np.linalg.eig(A)
    return {"re": w.real.tolist(), "im": w.imag.tolist(), "vre": v.real.tolist(), "vim": v.imag.tolist()}


def expm(case):
    return {"E": sl.expm(np.array(case["A"], dtype=float)).tolist()}


def vanloan(case):
    A = np.array(case["A"], dtype=float)
    Q = np.array(case["Q"], dtype=float)
    T = float(case["T"])
    phi = sl.expm(A * T)
    P = sl.solve_continuous_lyapunov(A, -Q)
    qd = P - phi @ P @ phi.T
    return {"phi": phi.tolist(), "qd": qd.tolist()}


def variance(case):
    A = np.array(case["A"], dtype=float)
    BWB = np.array(case["BWB"], dtype=float)
    C = np.array(case["c"], dtype=float)
    lam, V = np.linalg.eig(A)
    W = np.linalg.inv(V)
    keep = np.abs(lam) > 1e-9
    CV = C @ V
    S = W @ BWB @ W.conj().T
    out = []
    for r in range(C.shape[0]):
        acc = 0.0 + 0.0j
        for i in np.where(keep)[0]:
            for j in np.where(keep)[0]:
                acc += CV[r, i] * S[i, j] * np.conj(CV[r, j]) / (-(lam[i] + np.conj(lam[j])))
        out.append(float(acc.real))
    return {"var": out}


def forced(case):
    A = np.array(case["A"], dtype=float)
    b = np.array(case["b"], dtype=float)
    C = np.array(case["c"], dtype=float)
    d = np.array([complex(x[0], x[1]) for x in case["d"]])
    w = float(case["w"])
    x = np.linalg.solve(1j * w * np.eye(A.shape[0]) - A, b)
    g = C @ x + d
    return {"re": g.real.tolist(), "im": g.imag.tolist()}


OPS = {"eig": eig, "expm": expm, "vanloan": vanloan, "variance": variance, "forced": forced}

if __name__ == "__main__":
    req = json.load(sys.stdin)
    json.dump({"results": [OPS[c["op"]](c) for c in req["cases"]]}, sys.stdout)
