#!/usr/bin/python3
"""Straightforward numpy/scipy implementation of Keel's ambient scan, for the speed benchmark.

    /usr/bin/python3 scripts/bench/scan_speed_ref.py DIR

DIR holds meta.json and one float64 file per channel (written by scripts/bench/scan-speed.ts).
Same method and settings as modal/ambient-engine.ts with the default options, written the plain
numpy way: the whole record decimated at once, then every window recomputed from its samples
(lag products by vectorised products and group sums, spectra by batched FFTs, AR polynomials by
scipy.linalg.solve_toeplitz, poles by numpy.roots). Writes DIR/numpy.json with the time and, per
window, the strongest natural mode of the north–south band — the benchmark compares them with
Keel's. The benchmark day has no missing samples, so gap filling is not exercised here.
"""
import json
import math
import os
import sys
import time

import numpy as np
import scipy.linalg as sl
import scipy.signal as sig
import scipy.stats as st

# Default options (modal/ambient-options.ts)
WINDOW_S, STEP_S, BAND = 1200.0, 60.0, (0.1, 2.0)
AR_ORDER, GROUPS, CONF = 30, 10, 0.9
MAX_DAMP, MIN_STRENGTH = 20.0, 3.0
FORCED_MAX_DAMP, MIN_COH = 1.5, 0.5
SEGMENT_S = 60.0
REFERENCE = "tarrow-central.angle"
FORCED_SCREEN, MAX_LINES = 12.0, 3


def decimator(rate, q, pass_hz):
    out = rate / q
    stop = out - pass_hz
    n, beta = sig.kaiserord(60, (stop - pass_hz) / (rate / 2))
    if n % 2 == 0:
        n += 1
    return sig.firwin(n, (pass_hz + stop) / 2, window=("kaiser", beta), fs=rate)


def decimate(x, h, q):
    """Zero-phase FIR, odd-reflection ends, every q-th sample (as FirDecimator)."""
    d = (len(h) - 1) // 2
    ext = np.concatenate([2 * x[0] - x[d:0:-1], x, 2 * x[-1] - x[-2:-d - 2:-1]])
    r = (-2 * d) % q
    ext = np.concatenate([np.zeros(r), ext])
    y = sig.upfirdn(h, ext, up=1, down=q)
    first = (2 * d + r) // q
    n_out = -(-len(x) // q)
    return y[first:first + n_out]


def block_quality(raw, block, rate):
    """Dropouts, flat-line samples and outliers per block (block median/MAD), as Keel's blocks."""
    nb = len(raw) // block
    b = raw[: nb * block].reshape(nb, block)
    med = np.median(b, axis=1, keepdims=True)
    mad = np.median(np.abs(b - med), axis=1, keepdims=True)
    out = (np.abs(b - med) > 6 * 1.4826 * mad) & (mad > 0)
    min_flat = max(2, math.ceil(rate))
    flat = np.zeros(nb, int)
    for i in range(nb):
        edges = np.flatnonzero(np.diff(b[i]) != 0)
        lengths = np.diff(np.concatenate([[-1], edges, [block - 1]]))
        flat[i] = lengths[lengths >= min_flat].sum()
    return {"outliers": out.sum(axis=1), "flat": flat, "dropouts": np.isnan(b).sum(axis=1)}


def levinson(r, p):
    return np.concatenate([[1.0], sl.solve_toeplitz(r[:p], -r[1 : p + 1])])


def refine(a, z0, max_iter=30, max_move=0.2):
    da = np.polyder(a)
    z = complex(z0)
    for _ in range(max_iter):
        step = np.polyval(a, z) / np.polyval(da, z)
        z -= step
        if not np.isfinite(z) or abs(z - z0) > max_move:
            return None
        if abs(step) <= 1e-13 * max(1.0, abs(z)):
            return z
    return None


def pole_mode(z, fs):
    s = fs * np.log(z)
    return s.imag / (2 * np.pi), 100 * (-s.real / abs(s))


def principal(v):
    """v: (M, n) complex segment vectors. Unit principal eigenvector and trace of S = mean v vᴴ."""
    S = v.T @ v.conj() / len(v)
    w, U = np.linalg.eigh(S)
    return U[:, -1], float(np.real(np.trace(S))), float(w[-1])


def coherence(y, times, f0, T):
    p = np.sum(np.abs(y) ** 2)
    if p <= 0:
        return 0.0
    fs_ = f0 + np.arange(-4, 5) / (4 * T)
    c = np.exp(-2j * np.pi * np.outer(fs_, times)) @ y
    return float(np.max(np.abs(c) ** 2) / (len(y) * p))


def main():
    d = sys.argv[1]
    meta = json.load(open(os.path.join(d, "meta.json")))
    rate, names, n = meta["rate"], meta["names"], meta["samples"]
    raw = [np.fromfile(os.path.join(d, f"ch{k}.f64"), dtype=np.float64, count=n) for k in range(len(names))]
    t_start = time.perf_counter()
    c_start = time.process_time()

    q = int(round(rate / 5))
    fs = rate / q
    h = decimator(rate, q, BAND[1])
    W = int(round(WINDOW_S * fs))
    W -= W % GROUPS
    S = int(round(STEP_S * fs))
    G = W // GROUPS
    B = math.gcd(S, G)
    p = AR_ORDER
    L = p + 1
    nper = int(round(SEGMENT_S * fs))
    hop = nper // 2
    nfft = 1 << (nper - 1).bit_length()
    klo, khi = max(1, math.ceil(BAND[0] * nfft / fs)), min(nfft // 2, math.floor(BAND[1] * nfft / fs))
    nL = 1 << (W - 1).bit_length()
    kL0, kL1 = max(1, math.ceil(BAND[0] * nL / fs)), min(nL // 2, math.floor(BAND[1] * nL / fs))
    hann = 0.5 - 0.5 * np.cos(2 * np.pi * np.arange(nper) / nper)
    w2 = np.sum(hann ** 2)
    tq = st.t.ppf((1 + CONF) / 2, GROUPS - 1)
    rho = 1 - 2 * np.pi * (BAND[0] / 20) / fs

    # channels: angles unwrapped and relative to the reference, which is not analysed
    ref_idx = names.index(REFERENCE) if REFERENCE in names else None
    ref_unw = np.unwrap(raw[ref_idx], period=360) if ref_idx is not None else None
    chans = [k for k in range(len(names)) if k != ref_idx]
    quality = {names[k]: block_quality(raw[k], B * q, rate) for k in range(len(names))}
    X = []
    for k in chans:
        x = raw[k]
        if names[k].endswith(".angle"):
            x = np.unwrap(x, period=360) - (ref_unw if ref_unw is not None else 0)
        y = decimate(x, h, q)
        X.append(sig.lfilter([1.0, -1.0], [1.0, -rho], y, zi=[-y[0]])[0])
    X = np.array(X)
    C, Na = X.shape
    n_windows = (Na - W) // S + 1 if Na >= W else 0
    starts = np.arange(W // hop)
    fine_to_coarse = np.clip(np.round((np.arange(kL0, kL1 + 1) * fs / nL) * nfft / fs).astype(int) - klo, 0, khi - klo)

    results = []
    for w in range(n_windows):
        ws, we = w * S, w * S + W
        x = X[:, ws:we]
        m = x.mean(axis=1, keepdims=True)
        xc = x - m
        # centred lag sums per jackknife group: products x[t]·x[t−k] with t in the group, t − k ≥ ws
        Cg = np.empty((C, GROUPS, L))
        for k in range(L):
            prod = np.zeros((C, W))
            prod[:, k:] = xc[:, k:] * xc[:, : W - k]
            Cg[:, :, k] = prod.reshape(C, GROUPS, G).sum(axis=2)
        full = Cg.sum(axis=1)
        reps = full[:, None, :] - Cg
        var = full[:, 0] / W
        active = var > 1e-24
        sd = np.sqrt(np.where(active, var, 1))
        # Welch segments of the window
        seg_idx = [s for s in range(-(-ws // hop), (we - nper) // hop + 1)]
        segs = np.stack([X[:, s * hop : s * hop + nper] for s in seg_idx], axis=1)
        segs = (segs - segs.mean(axis=2, keepdims=True)) * hann
        F = np.fft.rfft(segs, n=nfft, axis=2)[:, :, klo : khi + 1] / sd[:, None, None]
        trace = np.sum(np.abs(F[active]) ** 2, axis=(0, 1))
        floor = np.median(trace)
        seg_times = (np.array(seg_idx) * hop - ws) / fs
        T = W / fs

        # forced-oscillation lines: full-window periodogram against the Welch density
        lines = []
        welch_d = np.mean(np.abs(F * sd[:, None, None]) ** 2, axis=1) / w2
        P = np.abs(np.fft.rfft(xc, n=nL, axis=1)[:, kL0 : kL1 + 1]) ** 2 / W
        lam = P / np.maximum(welch_d[:, fine_to_coarse], 1e-300)
        lam[~active] = 0
        cand = []
        for c in range(C):
            lc = lam[c]
            pk = np.flatnonzero((lc[1:-1] >= FORCED_SCREEN) & (lc[1:-1] >= lc[:-2]) & (lc[1:-1] > lc[2:])) + 1
            cand += [(lc[i], c, kL0 + i) for i in pk]
        cand.sort(key=lambda t: -t[0])
        tried = []
        tt = np.arange(W)
        for lv, c, kk in cand:
            if len(lines) >= MAX_LINES or len(tried) >= 2 * MAX_LINES:
                break
            f0 = kk * fs / nL
            if any(abs(f - f0) < 3 / T for f in tried):
                continue
            tried.append(f0)
            fref = _golden(lambda f: abs(np.dot(xc[c], np.exp(-2j * np.pi * f / fs * tt))) ** 2, f0 - fs / nL, f0 + fs / nL)
            amp = 2 * (xc @ np.exp(-2j * np.pi * fref / fs * tt)) / W
            amp[~active] = 0
            b = int(min(khi, max(klo, round(fref * nfft / fs)))) - klo
            u = amp / sd
            u = u / (np.linalg.norm(u) or 1)
            y = F[:, :, b].T @ u.conj()
            coh = coherence(y, seg_times, fref, T)
            if coh >= MIN_COH:
                lines.append((fref, amp))

        def pooled(weights):
            lag = np.arange(L)
            line_acf = np.zeros((C, L))
            for f, amp in lines:
                line_acf += 0.5 * np.abs(amp)[:, None] ** 2 * np.cos(2 * np.pi * f / fs * lag)[None, :]
            wts = np.where(active, weights, 0)
            sel = wts > 0
            v0 = np.maximum(full[:, 0] / W - line_acf[:, 0], 0.05 * full[:, 0] / W)
            fp = ((full / W - line_acf * (W - lag) / W) / v0[:, None])[sel]
            Wg = W - G
            r0 = np.maximum(reps[:, :, 0] / Wg - line_acf[:, None, 0], 0.05 * reps[:, :, 0] / Wg)
            rp = ((reps / Wg - line_acf[:, None, :] * (Wg - lag) / Wg) / r0[:, :, None])[sel]
            ws_ = wts[sel]
            return (ws_ @ fp) / ws_.sum(), np.einsum("c,cgk->gk", ws_, rp) / ws_.sum()

        f1, r1 = pooled(np.ones(C))
        a1 = levinson(f1, p)
        modes = []
        taken = []
        for z1 in np.roots(a1):
            if z1.imag <= 0:
                continue
            fr1, d1 = pole_mode(z1, fs)
            if not (BAND[0] <= fr1 <= BAND[1]) or not 0 < d1 < MAX_DAMP:
                continue
            b1 = int(min(khi, max(klo, round(fr1 * nfft / fs)))) - klo
            if floor <= 0 or trace[b1] / floor < MIN_STRENGTH:
                continue
            wts = np.mean(np.abs(F[:, :, b1]) ** 2, axis=1)
            fw, rw = pooled(wts)
            a2 = levinson(fw, p)
            z = refine(a2, z1)
            a_use, r_use = a2, rw
            if z is None:
                roots2 = np.roots(a2)
                dist = np.abs(roots2 - z1)
                z = roots2[np.argmin(dist)] if dist.min() < 0.05 else None
            if z is None:
                z, a_use, r_use = z1, a1, r1
            if any(abs(t - z) < 1e-4 for t in taken):
                continue
            fr, dp = pole_mode(z, fs)
            if not (BAND[0] <= fr <= BAND[1]) or not 0 < dp < MAX_DAMP:
                continue
            if any(abs(lf - fr) < max(3 / T, 1.5 * fs / nper) and dp < FORCED_MAX_DAMP for lf, _ in lines):
                continue
            taken.append(z)
            fs_rep, ds_rep = [], []
            for g in range(GROUPS):
                zz = refine(levinson(r_use[g], p), z)
                if zz is not None:
                    a, b_ = pole_mode(zz, fs)
                    fs_rep.append(a)
                    ds_rep.append(b_)
            if len(fs_rep) >= max(3, GROUPS - 2):
                jk = lambda v: math.sqrt((len(v) - 1) / len(v) * np.sum((np.array(v) - np.mean(v)) ** 2))
                fci = (fr - tq * jk(fs_rep), fr + tq * jk(fs_rep))
                dci = (dp - tq * jk(ds_rep), dp + tq * jk(ds_rep))
            else:
                fci, dci = (BAND[0], BAND[1]), (0.0, MAX_DAMP)
            b = int(min(khi, max(klo, round(fr * nfft / fs)))) - klo
            strength = trace[b] / floor
            if strength < MIN_STRENGTH:
                continue
            v = F[active][:, :, b].T
            u, tr, lam1 = principal(v)
            forced = False
            if dp < FORCED_MAX_DAMP:
                forced = coherence(v @ u.conj(), seg_times, fr, T) >= MIN_COH
            modes.append({"f": fr, "d": dp, "fci": fci, "dci": dci, "forced": forced, "strength": strength})
        for f, amp in lines:
            b = int(min(khi, max(klo, round(f * nfft / fs)))) - klo
            modes.append({"f": f, "d": 0.0, "fci": (f - 0.5 / T, f + 0.5 / T), "dci": (0, 0), "forced": True, "strength": trace[b] / floor})
        qual = {nm: int(quality[nm]["outliers"][ws // B : we // B].sum()) for nm in names}
        ns = sorted([md for md in modes if not md["forced"] and 0.2 <= md["f"] <= 0.45], key=lambda md: -md["strength"])
        best = ns[0] if ns else None
        results.append(
            {
                "start": meta["startTime"] + ws * q / rate,
                "skipped": False,
                "modes": len(modes),
                "forced": sum(1 for md in modes if md["forced"]),
                "ns": None
                if best is None
                else {"f": best["f"], "d": best["d"], "dLo": best["dci"][0], "dHi": best["dci"][1], "fLo": best["fci"][0], "fHi": best["fci"][1]},
                "outliers": sum(qual.values()),
            }
        )

    elapsed = time.perf_counter() - t_start
    cpu = time.process_time() - c_start
    json.dump({"seconds": elapsed, "cpuSeconds": cpu, "windows": results}, open(os.path.join(d, "numpy.json"), "w"))


def _golden(fn, a, b, tol=1e-7):
    g = (math.sqrt(5) - 1) / 2
    x1, x2 = b - g * (b - a), a + g * (b - a)
    f1, f2 = fn(x1), fn(x2)
    for _ in range(60):
        if b - a <= tol:
            break
        if f1 < f2:
            a, x1, f1 = x1, x2, f2
            x2 = a + g * (b - a)
            f2 = fn(x2)
        else:
            b, x2, f2 = x2, x1, f1
            x1 = b - g * (b - a)
            f1 = fn(x1)
    return x1 if f1 > f2 else x2


if __name__ == "__main__":
    main()
