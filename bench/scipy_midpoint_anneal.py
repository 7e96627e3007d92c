#!/usr/bin/python3
"""The straightforward SciPy alternative the benchmark compares against.

One anneal of an Ising problem (no fields) with linear scales A = 5 GHz (1 - s),
B = 5 GHz s, s = t / T, by midpoint exponentials:
    psi <- expm_multiply(-i 2 pi h H(t + h/2), psi),   H = -(A/2) sum_i X_i + (B/2) D,
with H a sparse CSR matrix and SciPy's generic expm_multiply (Al-Mohy and
Higham, SIAM J. Sci. Comput. 33, 488 (2011)). The step count N is doubled from
a coarse start until p is within --target of the reference p (from a tight
gapwise run) and of a run with 2N steps; the time reported is that of the
accepted (largest-step) run alone.

Usage: /usr/bin/python3 scipy_midpoint_anneal.py --qubits 8 --couplings '0,1,1;1,2,-1;' \
           --duration-ns 100 --reference-p 0.99 --target 1e-6
Prints one line: steps N p P error E wall SECONDS
"""
import argparse
import time

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import expm_multiply


def build(n, couplings):
    dim = 1 << n
    idx = np.arange(dim)
    diag = np.zeros(dim)
    for i, j, v in couplings:
        si = 1 - 2 * ((idx >> i) & 1)
        sj = 1 - 2 * ((idx >> j) & 1)
        diag += v * si * sj
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


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--qubits", type=int, required=True)
    ap.add_argument("--couplings", required=True)
    ap.add_argument("--duration-ns", type=float, required=True)
    ap.add_argument("--reference-p", type=float, required=True)
    ap.add_argument("--target", type=float, default=1e-6)
    ap.add_argument("--start-steps", type=int, default=25)
    a = ap.parse_args()
    couplings = [tuple(float(x) for x in c.split(",")) for c in a.couplings.split(";") if c]
    couplings = [(int(i), int(j), v) for i, j, v in couplings]
    xsum, dmat, diag = build(a.qubits, couplings)
    ground = np.isclose(diag, diag.min(), atol=1e-9)
    prob = lambda psi: float(np.sum(np.abs(psi[ground]) ** 2))
    steps = a.start_steps
    t0 = time.perf_counter()
    p_prev = prob(anneal(a.qubits, xsum, dmat, a.duration_ns, steps))
    wall_prev = time.perf_counter() - t0
    while True:
        t0 = time.perf_counter()
        p = prob(anneal(a.qubits, xsum, dmat, a.duration_ns, 2 * steps))
        wall = time.perf_counter() - t0
        # Accept N when it is within the target of the reference and of the finer run.
        if abs(p_prev - a.reference_p) <= a.target and abs(p_prev - p) <= a.target:
            print(f"steps {steps} p {p_prev:.15f} error {abs(p_prev - a.reference_p):.3e} wall {wall_prev:.6f}")
            return
        steps, p_prev, wall_prev = 2 * steps, p, wall
        if steps > 1 << 20:
            raise SystemExit("no convergence")


if __name__ == "__main__":
    main()
