#!/usr/bin/python3
"""Reference results from numpy/scipy (Debian's python3-numpy / python3-scipy) for the modal/ tests.

Reads one JSON object {"cases": [...]} on stdin and writes {"results": [...], "versions": {...}}
on stdout, one result per case in the same order, so a test file makes a single call (importing
scipy.signal costs most of a second). Complex numbers travel as [re, im] pairs.

Case kinds (the reference each one uses is named in the test beside the check):
  eigvals        {"a": [[...]]}                      numpy.linalg.eigvals
  roots          {"p": [...]}                        numpy.roots
  svd            {"a": [[...]]}                      numpy.linalg.svd (singular values, and |V| columns)
  lstsq          {"a": [[...]], "b": [[...]]}        numpy.linalg.lstsq (rcond=None)
  butter_bp      {"order", "low", "high", "fs"}      scipy.signal.butter(..., 'bandpass', output='sos')
  butter_lp      {"order", "cutoff", "fs"}           scipy.signal.butter(..., output='sos')
  cheby1_lp      {"order", "rp", "wn"}               scipy.signal.cheby1(..., output='sos')
  sosfiltfilt    {"sos": [[...]], "x": [...]}        scipy.signal.sosfiltfilt (defaults)
  sosfilt_zi     {"sos": [[...]]}                    scipy.signal.sosfilt_zi
  decimate       {"x": [...], "q"}                   scipy.signal.decimate(ftype='iir', zero_phase=True)
  unwrap_deg     {"x": [...]}                        numpy.unwrap(x, period=360)
  detrend        {"x": [...], "type"}                scipy.signal.detrend
  mp_poles       {"signals": [[...]], "order", "pencil"}  matrix pencil written with numpy.linalg
                                                     (svd, lstsq, eigvals) — an independent implementation
  prony_poles    {"signals": [[...]], "order"}       least-squares Prony with numpy.linalg.lstsq and numpy.roots
"""
import json
import sys

import numpy as np
import scipy
import scipy.signal as sig


def cplx(v):
    return [[float(np.real(z)), float(np.imag(z))] for z in np.atleast_1d(v)]


def mp_poles(signals, order, pencil):
    rows = []
    for x in signals:
        x = np.asarray(x, dtype=float)
        n = len(x)
        rows.append(np.array([x[i:i + pencil + 1] for i in range(n - pencil)]))
    y = np.vstack(rows)
    _, s, vt = np.linalg.svd(y, full_matrices=False)
    v = vt[:order].T  # (L+1) x M
    v1, v2 = v[:-1], v[1:]
    a = np.linalg.lstsq(v1, v2, rcond=None)[0]
    return np.linalg.eigvals(a), s


def prony_poles(signals, order):
    a_rows, b_rows = [], []
    for x in signals:
        x = np.asarray(x, dtype=float)
        for t in range(order, len(x)):
            a_rows.append(x[t - order:t][::-1])
            b_rows.append(-x[t])
    coef = np.linalg.lstsq(np.array(a_rows), np.array(b_rows), rcond=None)[0]
    return np.roots(np.concatenate(([1.0], coef)))


def run(case):
    k = case["kind"]
    if k == "eigvals":
        return {"values": cplx(np.linalg.eigvals(np.array(case["a"], dtype=float)))}
    if k == "roots":
        return {"values": cplx(np.roots(np.array(case["p"], dtype=float)))}
    if k == "svd":
        a = np.array(case["a"], dtype=float)
        u, s, vt = np.linalg.svd(a, full_matrices=False)
        return {"s": s.tolist(), "u": u.tolist(), "vt": vt.tolist()}
    if k == "lstsq":
        x, _, rank, s = np.linalg.lstsq(np.array(case["a"], dtype=float), np.array(case["b"], dtype=float), rcond=None)
        return {"x": x.tolist(), "rank": int(rank), "s": s.tolist()}
    if k == "butter_bp":
        return {"sos": sig.butter(case["order"], [case["low"], case["high"]], "bandpass", fs=case["fs"], output="sos").tolist()}
    if k == "butter_lp":
        return {"sos": sig.butter(case["order"], case["cutoff"], fs=case["fs"], output="sos").tolist()}
    if k == "cheby1_lp":
        return {"sos": sig.cheby1(case["order"], case["rp"], case["wn"], output="sos").tolist()}
    if k == "sosfiltfilt":
        return {"y": sig.sosfiltfilt(np.array(case["sos"]), np.array(case["x"], dtype=float)).tolist()}
    if k == "sosfilt_zi":
        return {"zi": sig.sosfilt_zi(np.array(case["sos"])).tolist()}
    if k == "decimate":
        return {"y": sig.decimate(np.array(case["x"], dtype=float), case["q"], ftype="iir", zero_phase=True).tolist()}
    if k == "unwrap_deg":
        return {"y": np.unwrap(np.array(case["x"], dtype=float), period=360).tolist()}
    if k == "detrend":
        return {"y": sig.detrend(np.array(case["x"], dtype=float), type=case["type"]).tolist()}
    if k == "mp_poles":
        z, s = mp_poles(case["signals"], case["order"], case["pencil"])
        return {"poles": cplx(z), "s": s.tolist()}
    if k == "prony_poles":
        return {"poles": cplx(prony_poles(case["signals"], case["order"]))}
    raise ValueError("unknown case kind: %s" % k)


def main():
    request = json.load(sys.stdin)
    results = [run(c) for c in request["cases"]]
    json.dump({"results": results, "versions": {"numpy": np.__version__, "scipy": scipy.__version__}}, sys.stdout)


if __name__ == "__main__":
    main()
