"""Times numpy/scipy on the same inputs as our benchmark, in the same run.

Usage: OPENBLAS_NUM_THREADS=1 python3 test/bench/reference.py cases.json times.json
cases.json: [{"id", "op", "args": {...matrices as nested lists...}, "repeats"}]
times.json: {"versions": {...}, "times": {id: median seconds}}
"""
import json
import sys
import time

import numpy as np
import scipy
import scipy.linalg as sla
import scipy.signal as sig


def op_fn(op, a):
    A = np.array(a["A"], dtype=float) if "A" in a else None
    if op == "schur":
        return lambda: sla.schur(A, output="real")
    if op == "qz":
        E = np.array(a["E"], dtype=float)
        return lambda: sla.qz(A, E, output="real")
    if op == "expm":
        return lambda: sla.expm(A)
    if op == "lyapunov":
        Q = np.array(a["Q"], dtype=float)
        return lambda: sla.solve_continuous_lyapunov(A, -Q)
    if op == "care":
        B, Q, R = (np.array(a[k], dtype=float) for k in ("B", "Q", "R"))
        return lambda: sla.solve_continuous_are(A, B, Q, R)
    if op == "dare":
        B, Q, R = (np.array(a[k], dtype=float) for k in ("B", "Q", "R"))
        return lambda: sla.solve_discrete_are(A, B, Q, R)
    if op == "place":
        B = np.array(a["B"], dtype=float)
        poles = np.array(a["polesRe"], dtype=float) + 1j * np.array(a["polesIm"], dtype=float)
        return lambda: sig.place_poles(A, B, poles, method="YT")
    if op == "freqresp":
        B, C, D = (np.array(a[k], dtype=float) for k in ("B", "C", "D"))
        w = np.array(a["w"], dtype=float)
        system = sig.StateSpace(A, B, C, D)
        return lambda: sig.freqresp(system, w=w)
    if op == "lsim":
        B, C, D = (np.array(a[k], dtype=float) for k in ("B", "C", "D"))
        t = np.array(a["t"], dtype=float)
        u = np.ones(len(t))
        return lambda: sig.lsim((A, B, C, D), u, t, interp=False)
    raise ValueError(f"unknown op {op}")


BLOCKS = 3  # as harness.ts: the smallest median of BLOCKS blocks, robust to load bursts


def median_time(fn, repeats):
    fn()  # warm-up
    best = float("inf")
    per_block = max(1, -(-repeats // BLOCKS))
    for _ in range(BLOCKS):
        samples = []
        for _ in range(per_block):
            t0 = time.perf_counter()
            fn()
            samples.append(time.perf_counter() - t0)
        samples.sort()
        best = min(best, samples[len(samples) // 2])
    return best


def main():
    cases = json.load(open(sys.argv[1]))
    times = {}
    for case in cases:
        try:
            times[case["id"]] = median_time(op_fn(case["op"], case["args"]), case["repeats"])
        except Exception as exc:  # report, do not abort the whole run
            times[case["id"]] = None
            print(f"reference {case['id']}: {exc}", file=sys.stderr)
    json.dump({"versions": {"numpy": np.__version__, "scipy": scipy.__version__}, "times": times}, open(sys.argv[2], "w"))


if __name__ == "__main__":
    main()
