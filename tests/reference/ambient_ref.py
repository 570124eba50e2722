#!/usr/bin/python3
"""Reference values for Keel's ambient estimators from Debian's numpy/scipy (library).

Reads {"cases": [...]} as JSON on stdin and writes {"results": [...]} on stdout, one result per
case in the same order, so each test file makes a single call (importing scipy.signal costs
~0.5 s). Used by modal/spectral.test.ts, modal/ar.test.ts and modal/ambient-filters.test.ts.

Case kinds:
  welch     x, fs, nperseg, noverlap, nfft, detrend, scaling  -> scipy.signal.welch
  csd       x, y, fs, ...                                     -> scipy.signal.csd
  rfft      x, n                                              -> numpy.fft.rfft
  autocov   x, maxlag                                         -> numpy.correlate (biased, demeaned)
  yw        channels, order   -> pooled normalised autocorrelation, scipy.linalg.solve_toeplitz
  ls        channels, order   -> numpy.linalg.lstsq on the stacked covariance-method system
  roots     coeffs                                            -> numpy.roots
  kaiserord ripple, width                                     -> scipy.signal.kaiserord
  firwin    numtaps, cutoff, fs, beta                         -> scipy.signal.firwin(kaiser)
  fir_decimate  x, h, q  -> odd-reflection extension, numpy.convolve 'valid', every q-th sample
  t_ppf     p, df                                             -> scipy.stats.t.ppf
"""
import json
import sys

import numpy as np
import scipy.linalg as sl
import scipy.signal as sig
import scipy.stats as st


def cplx(v):
    v = np.asarray(v)
    return {"re": np.real(v).tolist(), "im": np.imag(v).tolist()}


def autocov(x, maxlag):
    x = np.asarray(x, float)
    y = x - x.mean()
    full = np.correlate(y, y, "full")[len(y) - 1:]
    return full[: maxlag + 1] / len(y)


def pooled(channels, maxlag):
    if len(channels) == 1:
        return autocov(channels[0], maxlag)
    acc = np.zeros(maxlag + 1)
    for c in channels:
        r = autocov(c, maxlag)
        acc += r / r[0]
    return acc / len(channels)


def run(case):
    k = case["kind"]
    if k in ("welch", "csd"):
        kw = dict(fs=case["fs"], window="hann", nperseg=case.get("nperseg"), noverlap=case.get("noverlap"),
                  nfft=case.get("nfft"), detrend=case.get("detrend", "constant"), scaling=case.get("scaling", "density"))
        if k == "welch":
            f, p = sig.welch(np.asarray(case["x"], float), **kw)
            return {"f": f.tolist(), "p": p.tolist()}
        f, p = sig.csd(np.asarray(case["x"], float), np.asarray(case["y"], float), **kw)
        return {"f": f.tolist(), **cplx(p)}
    if k == "rfft":
        return cplx(np.fft.rfft(np.asarray(case["x"], float), n=case["n"]))
    if k == "autocov":
        return {"r": autocov(case["x"], case["maxlag"]).tolist()}
    if k == "yw":
        p = case["order"]
        r = pooled([np.asarray(c, float) for c in case["channels"]], p)
        a = sl.solve_toeplitz(r[:p], -r[1 : p + 1])
        return {"a": [1.0] + a.tolist(), "r": r.tolist(), "sigma2": float(r[0] + np.dot(a, r[1 : p + 1]))}
    if k == "ls":
        p = case["order"]
        chans = [np.asarray(c, float) for c in case["channels"]]
        rows, rhs = [], []
        for c in chans:
            y = c - c.mean()
            scale = 1.0 / np.sqrt(np.mean(y * y)) if len(chans) > 1 else 1.0
            y = y * scale
            for t in range(p, len(y)):
                rows.append(-y[t - p : t][::-1])
                rhs.append(y[t])
        A = np.array(rows)
        b = np.array(rhs)
        a, *_ = np.linalg.lstsq(A, b, rcond=None)
        res = b - A @ a
        return {"a": [1.0] + a.tolist(), "sigma2": float(np.mean(res * res))}
    if k == "roots":
        return cplx(np.roots(np.asarray(case["coeffs"], float)))
    if k == "kaiserord":
        n, beta = sig.kaiserord(case["ripple"], case["width"])
        return {"numtaps": int(n), "beta": float(beta)}
    if k == "firwin":
        h = sig.firwin(case["numtaps"], case["cutoff"], window=("kaiser", case["beta"]), fs=case["fs"])
        return {"h": h.tolist()}
    if k == "fir_decimate":
        x = np.asarray(case["x"], float)
        h = np.asarray(case["h"], float)
        d = (len(h) - 1) // 2
        ext = np.concatenate([2 * x[0] - x[d:0:-1], x, 2 * x[-1] - x[-2 : -d - 2 : -1]])
        y = np.convolve(ext, h, mode="valid")
        return {"y": y[:: case["q"]].tolist()}
    if k == "t_ppf":
        return {"t": float(st.t.ppf(case["p"], case["df"]))}
    raise ValueError(f"unknown case kind {k}")


def main():
    cases = json.load(sys.stdin)["cases"]
    json.dump({"results": [run(c) for c in cases]}, sys.stdout)


if __name__ == "__main__":
    main()
