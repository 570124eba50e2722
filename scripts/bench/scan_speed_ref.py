#!/usr/bin/python3
"""Straightforward numpy/scipy implementation of Keel's ambient scan, for the speed benchmark.

    /usr/bin/python3 scripts/bench/scan_speed_ref.py DIR

DIR holds meta.json and one float64 file per channel (written by scripts/bench/scan-speed.ts).
Same method and settings as modal/ambient-engine.ts with the default options (method
'yule-walker'), written the plain numpy way: the whole record decimated at once, then every window
recomputed from its samples (lag products by vectorised products and group sums, spectra by batched
FFTs, AR polynomials by scipy.linalg.solve_toeplitz, poles by numpy.roots). Per window: lines
searched and removed, an AR(30) fit of the autocorrelation pooled over all channels proposes
candidates; each candidate is re-estimated from its modal filter's output (the channel combination
concentrating its variance at the candidate's frequency: scipy.linalg.eigh of the cross-spectral
matrix against the correlation matrix) by a modified Yule-Walker fit (AR order 3, equations from
lag 3, numpy.linalg.lstsq), jackknife replicates refit on that output; estimates closer than a
half-power half-width are merged; shapes from least-squares fits (numpy.linalg.pinv) of the
channels' cross-correlations with the output on the poles of all reported modes. Writes DIR/numpy.json with the time and, per
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
MAX_DAMP, MIN_STRENGTH = 20.0, 4.8  # minStrength in dB
FORCED_MAX_DAMP, MIN_COH = 1.5, 0.5
SEGMENT_S = 60.0
REFERENCE = "tarrow-central.angle"
# Constants of modal/ambient-engine.ts
FORCED_SCREEN, MAX_LINES = 12.0, 3
MYW_ORDER, MYW_FIRST_LAG, MYW_MIN_EQ, MYW_MAX_EQ, MYW_DECAY_SPAN = 3, 3, 9, 30, 0.5
FILTER_LOADING, SPEC_FLOOR_STRIDE = 1e-3, 6
RESIDUE_S, RESIDUE_OVERLAP = 6.0, 2


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


def round_half_up(x):
    """JavaScript's Math.round (Python's round() rounds halves to even)."""
    return math.floor(x + 0.5)


def peak_db(peak, floor):
    return max(-100.0, 10 * math.log10(peak / floor)) if peak > 0 and floor > 0 else -100.0


def modified_yule_walker(r, order, first, eq):
    """AR part from the extended Yule-Walker equations at lags first … first+eq−1, least squares."""
    k = np.arange(first, first + eq)
    A = r[np.abs(k[:, None] - np.arange(1, order + 1)[None, :])]
    x = np.linalg.lstsq(A, -r[k], rcond=np.finfo(float).eps * eq)[0]
    return np.concatenate([[1.0], x])


def group_lag_sums(y, L, G):
    """(groups, L): Σ y[t]·y[t−k] over t in each group, t − k ≥ 0 (within the window)."""
    W = len(y)
    out = np.empty((W // G, L))
    for k in range(L):
        prod = np.zeros(W)
        prod[k:] = y[k:] * y[: W - k]
        out[:, k] = prod.reshape(-1, G).sum(axis=1)
    return out


def modal_filter(Fa, b1, f1, R0, xa, sda, lines, act, fs, W, G):
    """Stage 2 for one candidate: the channel combination y = Σ w·x/σ with the largest share of its
    variance at bin b1 (leading generalised eigenvector of Re S(f) against the correlation matrix),
    then a modified Yule-Walker fit of y's autocovariance. "floor" when the bin does not stand
    MIN_STRENGTH above the floor of y's spectrum, None when no filter or no pole is found."""
    n = len(act)
    V = Fa[:, :, b1]
    A = V.real @ V.real.T + V.imag @ V.imag.T
    if not np.trace(A) > 0:
        return None
    try:
        _, U = sl.eigh(A, R0 + FILTER_LOADING * np.eye(n), subset_by_index=[n - 1, n - 1])
    except (np.linalg.LinAlgError, ValueError):
        return None
    w = U[:, 0]
    spec = np.sum(np.abs(np.einsum("i,isj->sj", w, Fa)) ** 2, axis=0)
    spec_floor = np.median(spec[::SPEC_FLOOR_STRIDE])
    strength_at = lambda j: peak_db(spec[j], spec_floor)
    if strength_at(b1) < MIN_STRENGTH:
        return "floor"
    g = w / sda
    y = g @ xa
    lag = np.arange(MYW_FIRST_LAG + MYW_MAX_EQ)
    line_acf = np.zeros(len(lag))
    for f, amp in lines:
        ay = np.sum(g * amp[act])
        line_acf += 0.5 * abs(ay) ** 2 * np.cos(2 * np.pi * f / fs * lag)
    groups = group_lag_sums(y, MYW_FIRST_LAG + MYW_MIN_EQ, G)

    def acf(s, count):
        k = np.arange(len(s))
        return s / count - line_acf[: len(s)] * (count - k) / count

    def fit(eq):
        try:
            a = modified_yule_walker(acf(groups.sum(axis=0), W), MYW_ORDER, MYW_FIRST_LAG, eq)
        except np.linalg.LinAlgError:
            return None
        if not np.all(np.isfinite(a)):
            return None
        best, zb = np.inf, None
        for r in np.roots(a):
            if not r.imag > 0:
                continue
            fr, dp = pole_mode(r, fs)
            if 0 < dp < MAX_DAMP and abs(fr - f1) < best:
                best, zb = abs(fr - f1), r
        return zb

    z0 = fit(MYW_MIN_EQ)
    if z0 is None:
        return None
    decay = fs / max(1e-9, -fs * math.log(abs(z0)))
    eq = min(MYW_MAX_EQ, max(MYW_MIN_EQ, round_half_up(MYW_DECAY_SPAN * decay)))
    if eq != MYW_MIN_EQ:
        groups = group_lag_sums(y, MYW_FIRST_LAG + eq, G)
        z = fit(eq)
        if z is None:
            return None
    else:
        z = z0
    full = groups.sum(axis=0)
    rep_a = []
    for gs in groups:
        try:
            ra = modified_yule_walker(acf(full - gs, W - G), MYW_ORDER, MYW_FIRST_LAG, eq)
        except np.linalg.LinAlgError:
            ra = None
        rep_a.append(ra)
    reps = [lambda zz, ra=ra: refine(ra, zz) if ra is not None else None for ra in rep_a]
    return {"z": z, "reps": reps, "w": w, "strength_at": strength_at, "y": y}


def residue_shape(y, basis, xa, sda, unit_groups, fs, W):
    """Channel responses from the cross-correlations with y at lags 1 … RESIDUE_S s, fitted on the
    exponentials of `basis` (the mode's own pole first): its coefficient per channel."""
    poles = [z for i, z in enumerate(basis) if i == 0 or 0.05 < abs(z) < 1.2]
    nc = sum(2 if z.imag > 0 else 1 for z in poles)
    Lx = max(round_half_up(RESIDUE_S * fs), 2 * nc)
    if nc >= Lx:
        return None
    tau = np.arange(1, Lx + 1)
    cols = []
    for z in poles:
        zt = z ** tau
        cols.append(zt.real)
        if z.imag > 0:
            cols.append(zt.imag)
    H = np.linalg.pinv(np.array(cols).T, rcond=1e-10)[:2]  # (2, Lx)
    # Σ_τ h_τ·Σ_t x[t+τ]·y[t] = Σ_t x[t]·u[t], u = y filtered by h (delay ≥ 1)
    u = np.stack([np.convolve(y, np.concatenate([[0.0], h]))[:W] for h in H])
    ab = xa @ u.T / W
    resp = ab[:, 0] - 1j * ab[:, 1]
    # magnitudes relative to the largest of each unit group, angles to the most participating channel
    mag = np.abs(resp)
    gmax = {gname: mag[unit_groups == gname].max() for gname in set(unit_groups)}
    ref = np.argmax(mag / sda)
    return mag / np.array([gmax[gname] for gname in unit_groups]), np.angle(resp / resp[ref], deg=True)


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
    unit_group = np.array([names[k].rsplit(".", 1)[-1] if "." in names[k] else "" for k in chans])
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
        roots1 = np.roots(a1)
        strength_at = lambda b: peak_db(trace[b], floor)
        bin_of = lambda f: int(min(khi, max(klo, round_half_up(f * nfft / fs)))) - klo
        act = np.flatnonzero(active)
        xa = xc[act]
        Fa = F[act]  # (n, segments, band bins), channels / their sd
        R0 = None
        taken = []
        cands = []
        for z1 in roots1:
            if z1.imag <= 0:
                continue
            fr1, d1 = pole_mode(z1, fs)
            if BAND[0] <= fr1 <= BAND[1] and 0 < d1 < MAX_DAMP:
                cands.append((z1, fr1, d1))
        cands.sort(key=lambda c: -strength_at(bin_of(c[1])))  # stable, strongest first
        natural = []
        for z1, fr1, d1 in cands:
            b1 = bin_of(fr1)
            # another pole of a peak already estimated
            if any(abs(k["f"] - fr1) < -k["sigma"] / (2 * np.pi) for k in natural):
                continue
            if R0 is None:
                R0 = (xa @ xa.T) / (W * np.outer(sd[act], sd[act]))
                np.fill_diagonal(R0, 1.0)
            filt = modal_filter(Fa, b1, fr1, R0, xa, sd[act], lines, act, fs, W, G)
            if filt == "floor":
                continue
            z, rep_fn = None, None
            if filt is not None:
                z, rep_fn = filt["z"], filt["reps"]
            else:
                if strength_at(b1) < MIN_STRENGTH:
                    continue
                wts = np.mean(np.abs(F[:, :, b1]) ** 2, axis=1)
                fw, rw = pooled(wts)
                a2 = levinson(fw, p)
                z = refine(a2, z1)
                r_use = rw
                if z is None:
                    roots2 = np.roots(a2)
                    dist = np.abs(roots2 - z1)
                    z = roots2[np.argmin(dist)] if dist.min() < 0.05 else None
                if z is None:
                    z, r_use = z1, r1
                rep_fn = [lambda zz, r=r_use[g]: refine(levinson(r, p), zz) for g in range(GROUPS)]
            if any(abs(t - z) < 1e-4 for t in taken):
                continue
            fr, dp = pole_mode(z, fs)
            if not (BAND[0] <= fr <= BAND[1]) or not 0 < dp < MAX_DAMP:
                continue
            if any(abs(lf - fr) < max(3 / T, 1.5 * fs / nper) and dp < FORCED_MAX_DAMP for lf, _ in lines):
                continue
            taken.append(z)
            fs_rep, ds_rep = [], []
            for rf in rep_fn:
                zz = rf(z)
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
            b = bin_of(fr)
            strength = filt["strength_at"](b) if filt is not None else strength_at(b)
            if strength < MIN_STRENGTH:
                continue
            v = Fa[:, :, b].T  # (segments, n)
            if filt is not None:
                # cross-spectrum of each channel with the filter output
                u = v.T @ (v @ filt["w"]).conj()
                u = u / (np.linalg.norm(u) or 1)
            else:
                u, tr, lam1 = principal(v)
            forced = False
            if dp < FORCED_MAX_DAMP:
                forced = coherence(v @ u.conj(), seg_times, fr, T) >= MIN_COH
            sigma = fs * math.log(abs(z))
            natural.append({"f": fr, "d": dp, "sigma": sigma, "z": z, "filt": filt, "fci": fci, "dci": dci, "forced": forced, "strength": strength})
        # split peaks: estimates closer than the larger half-power half-width are one mode
        natural.sort(key=lambda k: -k["strength"])
        hw = lambda k: -k["sigma"] / (2 * np.pi)
        modes = []
        for cand in natural:
            if not any(abs(k["f"] - cand["f"]) < max(hw(k), hw(cand)) for k in modes):
                modes.append(cand)
        # residue shapes on the poles of every reported mode and the stage-1 poles standing for none
        others = []
        for pz in roots1:
            if pz.imag < 0:
                continue
            if pz.imag == 0:
                others.append(pz)
                continue
            pf, _ = pole_mode(pz, fs)
            ps = fs * math.log(abs(pz))
            if not any(abs(k["f"] - pf) < RESIDUE_OVERLAP * (hw(k) - ps / (2 * np.pi)) for k in modes):
                others.append(pz)
        own = [k["z"] for k in modes]
        for i, k in enumerate(modes):
            if k["filt"] is None:
                continue
            sh = residue_shape(k["filt"]["y"], [own[i]] + own[:i] + own[i + 1 :] + others, xa, sd[act], unit_group[act], fs, W)
            if sh is not None:
                k["shape"] = sh
        for f, amp in lines:
            b = bin_of(f)
            modes.append({"f": f, "d": 0.0, "fci": (f - 0.5 / T, f + 0.5 / T), "dci": (0, 0), "forced": True, "strength": strength_at(b)})
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
