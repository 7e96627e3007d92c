#!/usr/bin/python3
"""The straightforward SciPy alternative the gap-search benchmark compares against.

The minimum gap of H(s) = -(A/2) sum_i X_i + (B/2) D, linear scales A = 5 GHz (1 - s),
B = 5 GHz s, found as a careful SciPy user would: eigsh (ARPACK, which='SA',
tol=0, i.e. machine precision) on a uniform grid of s, then the bounded Brent
minimiser of scipy.optimize.minimize_scalar between the grid neighbours of the
smallest sampled gap, to the same s tolerance as the tool. Without fields the
matrix is built in the even spin-flip sector, as the tool does. The gap is
E_g - E_0 with g the classical ground degeneracy in the space used (the tool's
definition); k = max(4, g + 1) levels.

Usage: /usr/bin/python3 scipy_gap_scan.py --qubits 12 --couplings '0,1,1;1,2,-1;' \
           --fields '0.15,-0.15,...' --points 101 --xatol 3e-7
Prints one line: s_star S gap G evaluations N wall SECONDS
"""
import argparse
import sys
import time

import numpy as np
import scipy.sparse as sp
from scipy.optimize import minimize_scalar
from scipy.sparse.linalg import eigsh


def build(n, couplings, fields):
    sector = not any(abs(h) > 0 for h in fields)
    m = n - 1 if sector else n
    dim = 1 << m
    idx = np.arange(dim, dtype=np.int64)
    diag = np.zeros(dim)
    spin = lambda q: 1 - 2 * ((idx >> q) & 1) if q < m else np.ones(dim)  # qubit n-1 up in the sector
    for i, j, v in couplings:
        diag += v * spin(i) * spin(j)
    for i, h in enumerate(fields):
        diag += h * spin(i)
    rows = [idx ^ (1 << q) for q in range(m)]
    if sector:  # X on qubit n-1 maps b to ~b, whose representative is b with the other bits flipped
        rows.append(idx ^ ((1 << m) - 1))
    nq = len(rows)
    xsum = sp.csr_matrix((np.ones(nq * dim), (np.concatenate(rows), np.tile(idx, nq))), shape=(dim, dim))
    return xsum, sp.diags(diag).tocsr(), diag


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--qubits", type=int, required=True)
    ap.add_argument("--couplings", required=True)
    ap.add_argument("--fields", default="")
    ap.add_argument("--points", type=int, default=101)
    ap.add_argument("--xatol", type=float, default=3e-7)
    argv = sys.argv[1:]
    for i, x in enumerate(argv[:-1]):  # a list starting with "-0.3" is a value, not an option
        if x == "--fields":
            argv[i:i + 2] = ["--fields=" + argv[i + 1]]
            break
    a = ap.parse_args(argv)
    couplings = [tuple(float(x) for x in c.split(",")) for c in a.couplings.split(";") if c]
    couplings = [(int(i), int(j), v) for i, j, v in couplings]
    fields = [float(x) for x in a.fields.split(",") if x] or [0.0] * a.qubits
    t0 = time.perf_counter()
    xsum, dmat, diag = build(a.qubits, couplings, fields)
    e_min = diag.min()
    g = int(np.sum(diag <= e_min + 1e-9 * max(1.0, abs(e_min))))
    k = max(4, g + 1)
    evals = [0]

    def gap(s):
        evals[0] += 1
        A, B = 5.0 * (1 - s), 5.0 * s
        if A == 0.0:
            e = np.sort(0.5 * B * diag)[:k]
        else:
            H = (-0.5 * A) * xsum + (0.5 * B) * dmat
            e = np.sort(eigsh(H, k=k, which="SA", tol=0)[0])
        return e[g] - e[0]

    s = np.linspace(0.0, 1.0, a.points)
    gaps = np.array([gap(x) for x in s])
    i = int(np.argmin(gaps))
    lo, hi = s[max(i - 1, 0)], s[min(i + 1, len(s) - 1)]
    r = minimize_scalar(gap, bounds=(lo, hi), method="bounded", options={"xatol": a.xatol})
    s_star, g_min = (r.x, r.fun) if r.fun <= gaps[i] else (s[i], gaps[i])
    wall = time.perf_counter() - t0
    print(f"s_star {s_star:.12f} gap {g_min:.14f} evaluations {evals[0]} wall {wall:.3f}")


if __name__ == "__main__":
    main()
