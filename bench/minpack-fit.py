"""
Single-diode fits of I-V files with MINPACK (scipy.optimize.least_squares, method='lm'), the
reference for bench/cli-vs-minpack.ts.

    python3 bench/minpack-fit.py FILE...

Reads the files the way the command line writes them for the benchmark (`# key: value` lines, then a
`V,I` header and rows), then fits each one and prints one JSON object: the fit time measured after
imports and file reading (start values, fit and RMSE included; wall and CPU) and each file's RMSE.

The model is the single-diode equation in its explicit Lambert W form (true-current residual, the
command line's default objective), fitted on x = [Iph, ln I0, n, ln Rs, ln Rsh]: MINPACK's LM has
no bounds, and the logarithms keep I0, Rs and Rsh positive. The Jacobian is MINPACK's own
forward differences (lmdif), as a plain least_squares(method='lm') call does. Start values follow
Phang, Chan & Phillips (1984), as the command line's do.
"""
import json
import math
import sys
import time

import numpy as np
from scipy.optimize import least_squares

BOLTZMANN_J_PER_K = 1.380649e-23  # CODATA 2018, exact
ELEMENTARY_CHARGE_C = 1.602176634e-19  # CODATA 2018, exact


def read_file(path):
    meta = {}
    rows = []
    with open(path, encoding="utf-8") as f:
        header_seen = False
        for line in f:
            line = line.strip()
            if not line:
                continue
            if line.startswith("#"):
                key, _, value = line[1:].partition(":")
                meta[key.strip().lower()] = value.strip()
            elif not header_seen:
                header_seen = True
            else:
                v, i = line.split(",")
                rows.append((float(v), float(i)))
    data = np.array(rows)
    order = np.argsort(data[:, 0])
    temp_c = float(meta.get("cell temperature", 25))
    cells = int(meta.get("cells in series", 1))
    return data[order, 0], data[order, 1], temp_c, cells


def wexp(x):
    """W(e^x) for real x, vectorised: Newton on w + ln w = x from a close start (4 steps reach 1e-15)."""
    w = np.where(x > 1.0, x - np.log(np.maximum(x, 1.0)), np.log1p(np.exp(np.minimum(x, 1.0))))
    for _ in range(4):
        w = w - w * (w + np.log(w) - x) / (1.0 + w)
    return w


def model_current(x, v, a):
    iph, ln_i0, n, ln_rs, ln_rsh = x
    i0, rs, rsh = math.exp(ln_i0), math.exp(ln_rs), math.exp(ln_rsh)
    a = n * a
    s = rs + rsh
    arg = math.log(rs * i0 * rsh / (a * s)) + rsh * (rs * (iph + i0) + v) / (a * s)
    return (rsh * (iph + i0) - v) / s - (a / rs) * wexp(arg)


def line_slope(v, i, centre, half_width):
    near = np.abs(v - centre) <= half_width
    if near.sum() < 3:
        near = np.argsort(np.abs(v - centre))[:3]
    return np.polyfit(v[near], i[near], 1)


def phang_start(v, i, cells, vt):
    """Phang et al. (1984) closed-form start from Isc, Voc, the MPP and the slopes at both ends."""
    voc_est = np.interp(0.0, -i, v)
    isc = float(np.polyval(line_slope(v, i, 0.0, 0.05 * voc_est), 0.0))
    k, b = line_slope(v, i, voc_est, 0.03 * voc_est)
    voc = float(-b / k)
    p = v * i
    m = int(np.argmax(p))
    vmp, imp = float(v[m]), float(i[m])
    r_ref = voc / isc
    slope_isc = -line_slope(v, i, 0.0, 0.1 * voc)[0]
    rsh0 = 1.0 / slope_isc if slope_isc > 0 else 1e3 * r_ref
    rs0 = -1.0 / k
    rsh = min(max(rsh0, 10 * r_ref), 1e6 * r_ref)
    rso = min(max(rs0, 1e-4 * r_ref), r_ref)
    isc_net = isc - voc / rsh
    denom = math.log(max(isc - vmp / rsh - imp, 1e-300)) - math.log(isc_net) + imp / isc_net
    a = (vmp + rso * imp - voc) / denom if denom != 0 else float("nan")
    if not math.isfinite(a) or a <= 0:
        a = 1.3 * vt
    a = min(max(a, 0.7 * vt), 2.8 * vt)
    i0 = isc_net * math.exp(-voc / a)
    rs = min(max(rso - a / isc_net, 1e-3 * r_ref), 0.5 * r_ref)
    iph = isc * (1 + rs / rsh) + i0 * math.expm1(isc * rs / a)
    return np.array([iph, math.log(i0), a / vt, math.log(rs), math.log(rsh)])


def fit(v, i, temp_c, cells):
    vt = cells * BOLTZMANN_J_PER_K * (temp_c + 273.15) / ELEMENTARY_CHARGE_C
    x0 = phang_start(v, i, cells, vt)
    result = least_squares(lambda x: model_current(x, v, vt) - i, x0, method="lm", x_scale="jac")
    rmse = float(np.sqrt(np.mean(result.fun**2)))
    return result, rmse


def main():
    files = sys.argv[1:]
    curves = [read_file(p) for p in files]
    # One fit before the clock starts, so the first call's set-up is not counted (the process is warm).
    fit(*curves[0])
    t0, c0 = time.perf_counter(), time.process_time()
    results = [fit(*c) for c in curves]
    fit_s, fit_cpu_s = time.perf_counter() - t0, time.process_time() - c0
    print(
        json.dumps(
            {
                "files": len(files),
                "fit_s": fit_s,
                "fit_cpu_s": fit_cpu_s,
                "converged": sum(1 for r, _ in results if r.success),
                "evaluations_mean": sum(r.nfev for r, _ in results) / len(results),
                "rmse_a": [rmse for _, rmse in results],
                "n": [float(r.x[2]) for r, _ in results],
            }
        )
    )


if __name__ == "__main__":
    main()
