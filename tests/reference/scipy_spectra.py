#!/usr/bin/env python3
"""Reference spectra from scipy for Corvane's frequency-domain engine (lib/engine/frequency).

Runs, on series this script builds itself (deterministic or seeded with numpy's default_rng):
  * scipy.signal.lombscargle on the beat times (angular frequencies 2*pi*f; NN minus its mean; normalize=False),
    on the grid f = 0.001 + 0.0005*j up to the mean Nyquist frequency (N-1)/(2*(t_N - t_1)), then scaled so that
    the trapezoid integral of the PSD over the grid equals the variance (ddof 0) of the window;
  * scipy.interpolate.CubicSpline(bc_type="natural") through (t_k, NN_k), sampled at 4 Hz from t_1 to t_N, mean
    removed, then scipy.signal.welch (window "hann", which scipy builds periodic; nperseg 256, noverlap 128,
    detrend "linear", scaling "density", one-sided, mean average);
  * for the spectral slope: lombscargle on f_j = j/T (T = t_N - t_1) over 1e-4..1e-2 Hz, PSD = 2*(T/(N-1))*P;
    in 10 logarithmic bins per decade the mean of log10 f and of log10 PSD (plus Euler's gamma / ln 10, the bias of
    the log of an exponential variable); numpy.polyfit of the second on the first, weighted by the bin counts.
Band powers integrate the linearly interpolated PSD between the band edges (numpy.interp + numpy.trapz), peaks are
the largest PSD value on the grid inside the band. Inputs and outputs go into one JSON fixture.

Usage: python3 scipy_spectra.py OUTPUT.json
"""
import json
import platform
import sys

import numpy as np
import scipy
from scipy.interpolate import CubicSpline
from scipy.signal import lombscargle, welch

BANDS = {"vlf": (0.003, 0.04), "lf": (0.04, 0.15), "hf": (0.15, 0.40)}
F_MIN, F_STEP = 0.001, 0.0005
EULER_LOG10 = np.euler_gamma / np.log(10)  # E[log10 of an exponential variable] = log10(mean) - this
FS, NPERSEG = 4.0, 256


def band_power(f, p, lo, hi):
    inner = (f > lo) & (f < hi)
    xs = np.concatenate([[lo], f[inner], [hi]])
    return float(np.trapz(np.interp(xs, f, p), xs))


def peak(f, p, lo, hi):
    inside = np.where((f >= lo - 1e-9) & (f <= hi + 1e-9))[0]
    return float(f[inside[np.argmax(p[inside])]])


def bands_of(f, p, top):
    """Bands that end at or below `top` (the mean Nyquist frequency for Lomb-Scargle); the others are left out."""
    out = {name: band_power(f, p, lo, hi) for name, (lo, hi) in BANDS.items() if hi <= top}
    for name in ("lf", "hf"):
        if name in out:
            out[name + "_peak_hz"] = peak(f, p, *BANDS[name])
    return out


def lomb_scargle(rr, t):
    y = rr - rr.mean()
    nyquist = (len(t) - 1) / (2 * (t[-1] - t[0]))
    count = int(np.floor((nyquist - F_MIN) / F_STEP + 1e-9)) + 1
    f = F_MIN + F_STEP * np.arange(count)
    power = lombscargle(t, y, 2 * np.pi * f, precenter=False, normalize=False)
    psd = power * np.mean(y * y) / np.trapz(power, f)
    result = {"f_min_hz": F_MIN, "f_step_hz": F_STEP, "count": count, "nyquist_hz": nyquist,
              "raw_max": float(power.max()), "psd": psd.tolist()}
    result.update(bands_of(f, psd, nyquist))
    return result


def resample(rr, t):
    spline = CubicSpline(t, rr, bc_type="natural")
    count = int(np.floor((t[-1] - t[0]) * FS + 1e-9)) + 1
    return spline(t[0] + np.arange(count) / FS)


def welch_psd(x):
    f, p = welch(x - x.mean(), fs=FS, window="hann", nperseg=NPERSEG, noverlap=NPERSEG // 2, detrend="linear",
                 scaling="density", return_onesided=True, average="mean")
    return f, p


def window_case(name, note, rr, t, store_times):
    x = resample(rr, t)
    f, p = welch_psd(x)
    w = {"f": f.tolist(), "psd": p.tolist()}
    w.update(bands_of(f, p, f[-1]))
    return {"name": name, "kind": "window", "note": note, "rr_ms": rr.tolist(),
            "t_s": t.tolist() if store_times else None,
            "lomb_scargle": lomb_scargle(rr, t),
            "resampled": {"start_s": float(t[0]), "rate_hz": FS, "values": x.tolist()},
            "welch": w}


def a9():
    """DOMAIN 3.1 A9: RR_k = 1000 + 30 sin(2 pi 0.1 t_{k-1}) + 50 sin(2 pi 0.25 t_{k-1}) while t <= 300 s."""
    t, rr, ts = 0.0, [], []
    while True:
        r = 1000 + 30 * np.sin(2 * np.pi * 0.1 * t) + 50 * np.sin(2 * np.pi * 0.25 * t)
        tn = t + r / 1000
        if tn > 300:
            break
        rr.append(r)
        ts.append(tn)
        t = tn
    return np.array(rr), np.array(ts)


def power_law_noise(rng, n, beta):
    """Spectral synthesis: random phases, Rayleigh amplitudes proportional to f^(-beta/2); unit variance."""
    freqs = np.fft.rfftfreq(n)
    amp = np.zeros_like(freqs)
    amp[1:] = freqs[1:] ** (-beta / 2)
    spectrum = amp * rng.rayleigh(size=len(freqs)) * np.exp(2j * np.pi * rng.random(len(freqs)))
    x = np.fft.irfft(spectrum, n)
    return (x - x.mean()) / x.std()


def healthy(rng, seconds=300.0, mean_rr=1000.0):
    """DOMAIN 6.1 in short: 45 ms of 1/f^1.3 background, 12 ms respiratory sinus arrhythmia with a wandering
    breathing rate (0.2-0.3 Hz), a 20 ms Mayer wave at 0.1 Hz; RR rounded to whole ms."""
    n = int(seconds * 1000 / mean_rr * 1.3)
    b = power_law_noise(rng, n, 1.3)
    f_resp, phase, mayer_phase = 0.25, 0.0, rng.random() * 2 * np.pi
    t, rr, ts = 0.0, [], []
    for k in range(n):
        r = round(mean_rr + 45 * b[k] + 12 * np.sin(phase) + 20 * np.sin(2 * np.pi * 0.1 * t + mayer_phase))
        if t + r / 1000 > seconds:
            break
        rr.append(r)
        t += r / 1000
        ts.append(t)
        phase += 2 * np.pi * f_resp * r / 1000
        f_resp = min(0.3, max(0.2, f_resp + rng.normal(0, 0.002)))
    rr = np.array(rr, dtype=float)
    return rr, np.cumsum(rr) / 1000


def slope_case(name, note, rng, beta, hours):
    n = int(hours * 3600)
    rr = np.round(1000 + 40 * power_law_noise(rng, n, beta))
    t = np.cumsum(rr) / 1000
    y = rr - rr.mean()
    span = t[-1] - t[0]
    j = np.arange(int(np.ceil(1e-4 * span - 1e-9)), int(np.floor(1e-2 * span + 1e-9)) + 1)
    f = j / span
    psd = 2 * (span / (len(t) - 1)) * lombscargle(t, y, 2 * np.pi * f, precenter=False, normalize=False)
    bins = np.minimum(np.floor((np.log10(f) - np.log10(1e-4)) * 10).astype(int), 19)
    xs, ys, counts = [], [], []
    for b in range(20):
        sel = bins == b
        if sel.any():
            xs.append(float(np.mean(np.log10(f[sel]))))
            ys.append(float(np.mean(np.log10(psd[sel])) + EULER_LOG10))
            counts.append(int(sel.sum()))
    slope, intercept = np.polyfit(xs, ys, 1, w=np.sqrt(counts))
    return {"name": name, "kind": "slope", "note": note, "beta_generated": beta, "rr_ms": rr.tolist(), "t_s": None,
            "frequency_hz": f.tolist(), "psd": psd.tolist(), "log10_f": xs, "log10_psd": ys, "counts": counts,
            "beta": float(slope), "intercept": float(intercept)}


def main(path):
    cases = []
    rr, t = a9()
    cases.append(window_case("A9 two-tone", "DOMAIN 3.1 A9, deterministic", rr, t, True))

    rng = np.random.default_rng(20260311)
    rr, t = healthy(rng)
    cases.append(window_case("healthy-like 5 min", "seed 20260311, first draw", rr, t, False))

    rr, t = healthy(rng)
    keep = np.ones(len(rr), dtype=bool)
    keep[rng.choice(np.arange(20, len(rr) - 20), size=6, replace=False)] = False
    cases.append(window_case("healthy-like 5 min, 6 beats deleted", "seed 20260311, second draw; beats removed, "
                             "times kept", rr[keep], t[keep], True))

    rr = np.round(350 + rng.gamma(3.0, 100.0, size=600))
    t = np.cumsum(rr) / 1000
    keep = t <= 300
    cases.append(window_case("AF-like 5 min", "seed 20260311, third draw: 350 + Gamma(3, 100) ms, iid (DOMAIN 6.3)",
                             rr[keep], t[keep], False))

    rr, t = healthy(rng, mean_rr=1330.0)
    cases.append(window_case("45 bpm 5 min", "seed 20260311, fourth draw; mean Nyquist below 0.40 Hz", rr, t, False))

    cases.append(slope_case("1/f noise 3.5 h", "seed 20260311, fifth draw: 1000 + 40 b ms, b 1/f (beta 1) by "
                            "spectral synthesis", rng, 1.0, 3.5))

    fixture = {
        "source": "scipy.signal.lombscargle, scipy.interpolate.CubicSpline(bc_type='natural'), scipy.signal.welch",
        "generated_by": "tests/reference/scipy_spectra.py",
        "tool_versions": {"python": platform.python_version(), "numpy": np.__version__, "scipy": scipy.__version__},
        "notes": "t_s null means t_k = cumsum(rr_ms)/1000 (exact: whole-ms intervals). Resampled values are the spline "
                 "samples before mean removal.",
        "cases": cases,
    }
    with open(path, "w") as fh:
        json.dump(fixture, fh)
        fh.write("\n")


if __name__ == "__main__":
    main(sys.argv[1])
