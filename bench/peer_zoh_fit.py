#!/usr/bin/env python3
"""Peer fit for the end-to-end bench (bench/cli.ts): the same CSV, fitted with numpy + scipy.

Usage: python3 bench/peer_zoh_fit.py FILE.csv '{"R":3,"L":5e-4,"K":0.075,"J":1e-5,"b":1.5e-5}'

Reads the recording with numpy.loadtxt (header "time [s],voltage [V],current [A],speed [rad/s]"),
then fits the lumped DC-motor model

    L di/dt = v - R i - K w,    J dw/dt = K i - b w      (Kt = Ke = K in SI)

discretised exactly under a zero-order hold on the logged voltage (x[k+1] = Phi x[k] + Gamma v[k],
Phi and Gamma from one 3x3 matrix exponential, x[0] = 0), run as two second-order IIR filters
(scipy.signal.lfilter). scipy.optimize.least_squares (trust-region reflective, finite-difference
Jacobian) minimises the current and speed residuals, each divided by its noise level, over
ln(R, L, K, J, b) from the start given as the second argument. The noise level of a channel is
1.4826 * MAD of its second differences / sqrt(6) (the second difference of white noise has variance
6 sigma^2; the median ignores the jumps at the input switches).

Prints one JSON line: the estimates [SI], solver counts and status, and the times [s] of the imports,
the load and the fit (perf_counter inside this process).
"""
import json
import sys
import time

t_start = time.perf_counter()
import numpy as np  # noqa: E402
from scipy.linalg import expm  # noqa: E402
from scipy.optimize import least_squares  # noqa: E402
from scipy.signal import lfilter  # noqa: E402

t_imported = time.perf_counter()

NAMES = ("R", "L", "K", "J", "b")


def noise_level(x):
    d = x[2:] - 2.0 * x[1:-1] + x[:-2]
    return 1.4826 * np.median(np.abs(d - np.median(d))) / np.sqrt(6.0)


def zoh_filters(p, dt):
    """Numerator and denominator of v -> i and v -> w for ln-parameters p."""
    R, L, K, J, b = np.exp(p)
    m = np.zeros((3, 3))
    m[0, 0], m[0, 1], m[0, 2] = -R / L, -K / L, 1.0 / L
    m[1, 0], m[1, 1] = K / J, -b / J
    e = expm(m * dt)
    p11, p12, p21, p22 = e[0, 0], e[0, 1], e[1, 0], e[1, 1]
    g1, g2 = e[0, 2], e[1, 2]
    # (zI - Phi)^-1 Gamma = adj(zI - Phi) Gamma / det(zI - Phi)
    den = np.array([1.0, -(p11 + p22), p11 * p22 - p12 * p21])
    num_i = np.array([0.0, g1, p12 * g2 - p22 * g1])
    num_w = np.array([0.0, g2, p21 * g1 - p11 * g2])
    return num_i, num_w, den


def main():
    path = sys.argv[1]
    start = json.loads(sys.argv[2])
    t0 = time.perf_counter()
    with open(path, encoding="utf-8") as f:
        header = [h.split("[")[0].strip() for h in f.readline().split(",")]
    data = np.loadtxt(path, delimiter=",", skiprows=1)
    t1 = time.perf_counter()
    t = data[:, header.index("time")]
    v = np.ascontiguousarray(data[:, header.index("voltage")])
    i_meas = np.ascontiguousarray(data[:, header.index("current")])
    w_meas = np.ascontiguousarray(data[:, header.index("speed")])
    dt = float(np.median(np.diff(t)))
    si, sw = noise_level(i_meas), noise_level(w_meas)

    def residuals(p):
        num_i, num_w, den = zoh_filters(p, dt)
        ri = (lfilter(num_i, den, v) - i_meas) / si
        rw = (lfilter(num_w, den, v) - w_meas) / sw
        return np.concatenate((ri, rw))

    x0 = np.log([start[n] for n in NAMES])
    res = least_squares(residuals, x0, method="trf")
    t2 = time.perf_counter()
    est = dict(zip(NAMES, np.exp(res.x).tolist()))
    print(json.dumps({
        "estimates": est,
        "nfev": int(res.nfev),
        "njev": int(res.njev) if res.njev is not None else None,
        "status": int(res.status),
        "success": bool(res.success),
        "ssr": float(2.0 * res.cost),
        "samples": int(len(t)),
        "noise": {"current": float(si), "speed": float(sw)},
        "seconds": {"imports": t_imported - t_start, "load": t1 - t0, "fit": t2 - t1},
        "versions": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": __import__("scipy").__version__},
    }))


if __name__ == "__main__":
    main()
