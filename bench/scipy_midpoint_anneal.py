#!/usr/bin/python3
"""The straightforward SciPy alternative the benchmark compares against.

One anneal of an Ising problem (couplings and fields) with linear scales
A = 5 GHz (1 - s), B = 5 GHz s, s = t / T, by midpoint exponentials:
    psi <- expm_multiply(-i 2 pi h H(t + h/2), psi),   H = -(A/2) sum_i X_i + (B/2) D,
with H a sparse CSR matrix and SciPy's generic expm_multiply (Al-Mohy and
Higham, SIAM J. Sci. Comput. 33, 488 (2011)). The step count N is doubled from
a coarse start until p is within --target of the reference p (from a tight
gapwise run) and of a run with 2N steps; then 3N/4 is tried under the same
test (the largest step that meets the accuracy, to within a factor 4/3). The
time reported is that of the accepted run alone.

Usage: /usr/bin/python3 scipy_midpoint_anneal.py --qubits 8 --couplings '0,1,1;1,2,-1;' \
           [--fields '0.1,0,...'] --duration-ns 100 --reference-p 0.99 --target 1e-6
Prints one line: steps N p P error E wall SECONDS
"""
import argparse
import time

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import expm_multiply


def diagonal(n, couplings, fields):
    """Problem energies D_b, bit i of b is z_i, spin s_i = 1 - 2 z_i (physics conventions)."""
    idx = np.arange(1 << n)
    spin = [1 - 2 * ((idx >> i) & 1) for i in range(n)]
    diag = np.zeros(1 << n)
    for i, j, v in couplings:
        diag += v * spin[i] * spin[j]
    for i, v in enumerate(fields):
        diag += v * spin[i]
    return diag


def build(n, couplings, fields):
    dim = 1 << n
    idx = np.arange(dim)
    diag = diagonal(n, couplings, fields)
    rows = np.concatenate([idx ^ (1 << q) for q in range(n)])
    cols = np.tile(idx, n)
    xsum = sp.csr_matrix((np.ones(n * dim), (rows, cols)), shape=(dim, dim))
    return xsum, sp.diags(diag).tocsr(), diag


def anneal(n, xsum, dmat, T, steps):
    dim = 1 << n
    psi = np.full(dim, 2.0 ** (-n / 2), dtype=complex)
    h = T / steps
    for k in range(steps):
        s = (k + 0.5) * h / T
        H = (-0.5 * 5.0 * (1 - s)) * xsum + (0.5 * 5.0 * s) * dmat
        psi = expm_multiply((-2j * np.pi * h) * H, psi)
    return psi


def parse_problem(a):
    couplings = [tuple(float(x) for x in c.split(",")) for c in a.couplings.split(";") if c]
    couplings = [(int(i), int(j), v) for i, j, v in couplings]
    fields = [float(x) for x in a.fields.split(",") if x] if a.fields else []
    return couplings, fields


def problem_arguments():
    """The options both peer scripts share (the problem, the duration, the accuracy test)."""
    ap = argparse.ArgumentParser()
    ap.add_argument("--qubits", type=int, required=True)
    ap.add_argument("--couplings", required=True)
    ap.add_argument("--fields", default="")
    ap.add_argument("--duration-ns", type=float, required=True)
    ap.add_argument("--reference-p", type=float, required=True)
    ap.add_argument("--target", type=float, default=1e-6)
    ap.add_argument("--budget-s", type=float, default=1e9, help="give up after this much wall time in all")
    return ap


def main():
    ap = problem_arguments()
    ap.add_argument("--start-steps", type=int, default=25)
    a = ap.parse_args()
    couplings, fields = parse_problem(a)
    xsum, dmat, diag = build(a.qubits, couplings, fields)
    ground = np.isclose(diag, diag.min(), rtol=0, atol=1e-9 * max(1.0, np.abs(diag).max()))
    prob = lambda psi: float(np.sum(np.abs(psi[ground]) ** 2))
    start = time.perf_counter()

    def timed(steps):
        t0 = time.perf_counter()
        p = prob(anneal(a.qubits, xsum, dmat, a.duration_ns, steps))
        if time.perf_counter() - start > a.budget_s:
            raise SystemExit(f"over the budget of {a.budget_s:.0f} s at {steps} steps")
        return p, time.perf_counter() - t0

    ok = lambda p, finer: abs(p - a.reference_p) <= a.target and abs(p - finer) <= a.target
    steps = a.start_steps
    p_prev, wall_prev = timed(steps)
    while True:
        p, wall = timed(2 * steps)
        if ok(p_prev, p):
            break
        steps, p_prev, wall_prev = 2 * steps, p, wall
        if steps > 1 << 20:
            raise SystemExit("no convergence")
    # One step back towards the largest step that passes: 3N/4 against the same 2N run.
    if steps >= 8:
        p34, wall34 = timed(3 * steps // 4)
        if ok(p34, p):
            steps, p_prev, wall_prev = 3 * steps // 4, p34, wall34
    print(f"steps {steps} p {p_prev:.15f} error {abs(p_prev - a.reference_p):.3e} wall {wall_prev:.6f}")


if __name__ == "__main__":
    main()
