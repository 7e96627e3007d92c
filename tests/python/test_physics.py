"""The module's answers against results from outside the project.

- Transverse-field Ising ring (Pfeuty, Ann. Phys. 57, 79 (1970)): Jordan-Wigner
  free fermions. With H = -(A/2) sum X_i - (B/2) sum Z_i Z_{i+1} (our units,
  J = -1), the even spin-flip sector has antiperiodic fermion momenta
  k = (2m - 1) pi / n, each pair (k, -k) a two-level problem
  H_k = -(A - B cos k) tau_z + (B sin k) tau_x (Dziarmaga, Phys. Rev. Lett. 95,
  245701 (2005), rescaled to our coefficients; the same reduction as
  tests/test_free_fermion_ring.cpp). The lowest even excitation fills the pair
  k = pi/n: gap 2 sqrt(A^2 + B^2 - 2 A B cos(pi/n)).
- The ring's sweep, mode by mode, integrated by SciPy's DOP853 (a general-purpose
  reference integrator) at 1e-12: p_ground = prod_k (1 - p_k).
- Non-interacting qubits with fields: the n-qubit ground-state probability is the
  product of the single-qubit ones (the physics conventions' worked check).
"""
import math
import threading
import time

import numpy as np
import pytest
from scipy.integrate import solve_ivp

import gapwise

LINEAR = {"scales": {"kind": "linear", "a_max_ghz": 5.0, "b_max_ghz": 5.0},
          "path": {"time": "fraction", "duration_ns": 10.0, "points": [[0.0, 0.0], [1.0, 1.0]]}}


def ring(n):
    return gapwise.ising(h=np.zeros(n), J={(i, (i + 1) % n): -1.0 for i in range(n)})


def test_ring_gap_along_s_is_the_free_fermion_gap():
    n = 8
    r = gapwise.gap_scan(ring(n), LINEAR, points=41)
    c = r["curve"]
    exact = 2.0 * np.sqrt(c["a"] ** 2 + c["b"] ** 2 - 2.0 * c["a"] * c["b"] * math.cos(math.pi / n))
    assert r["sector"] == "even" and r["definition"].startswith("E_1 - E_0")
    np.testing.assert_allclose(c["gap"], exact, rtol=0, atol=1e-9)
    # Minimum at A = B (s = 1/2 for equal linear ramps): 2 * 2.5 * sqrt(2 - 2 cos(pi/8)) = 10 sin(pi/16).
    assert r["gap_ghz"] == pytest.approx(10.0 * math.sin(math.pi / 16), abs=1e-8)
    assert r["s_star"] == pytest.approx(0.5, abs=1e-5)


def free_fermion_ground_probability(n, duration_ns, scale=5.0):
    p = 1.0
    for m in range(1, n // 2 + 1):
        k = (2 * m - 1) * math.pi / n

        def rhs(t, y):
            s = t / duration_ns
            A, B = scale * (1 - s), scale * s
            hz, hx = -(A - B * math.cos(k)), B * math.sin(k)
            u, v = y[0] + 1j * y[1], y[2] + 1j * y[3]
            du = -2j * math.pi * (hz * u + hx * v)
            dv = -2j * math.pi * (hx * u - hz * v)
            return [du.real, du.imag, dv.real, dv.imag]

        sol = solve_ivp(rhs, (0.0, duration_ns), [1.0, 0.0, 0.0, 0.0], method="DOP853", rtol=1e-12, atol=1e-12)
        u, v = sol.y[0, -1] + 1j * sol.y[1, -1], sol.y[2, -1] + 1j * sol.y[3, -1]
        # Ground state of H_k(end) = B (cos k tau_z + sin k tau_x): eigenvalue -B.
        w, vec = np.linalg.eigh(np.array([[math.cos(k), math.sin(k)], [math.sin(k), -math.cos(k)]]))
        g = vec[:, 0]
        p *= abs(g[0] * u + g[1] * v) ** 2
    return p


@pytest.mark.parametrize("duration_ns", [0.3, 0.8])
def test_ring_sweep_matches_the_free_fermion_modes(duration_ns):
    n = 8
    exact = free_fermion_ground_probability(n, duration_ns)
    r = gapwise.anneal(ring(n), LINEAR, duration_ns, tolerance=1e-8)
    assert 0.05 < exact < 0.95  # a regime where the sweep is neither sudden nor adiabatic
    assert r["ground_probability"] == pytest.approx(exact, abs=1e-7)  # measured: ~1e-9


def test_independent_qubits_with_fields_multiply():
    h = [0.3, -0.7, 1.1]
    together = gapwise.anneal(gapwise.ising(h=h, J={}), LINEAR, 0.3, tolerance=1e-9)["ground_probability"]
    alone = [gapwise.anneal(gapwise.ising(h=[x]), LINEAR, 0.3, tolerance=1e-9)["ground_probability"] for x in h]
    assert 0.1 < together < 0.9
    assert together == pytest.approx(np.prod(alone), abs=1e-8)  # measured: ~4e-11


def test_the_gil_is_released_during_a_long_call():
    # A second Python thread keeps counting while the library computes; were the
    # GIL held, it could not run at all until the call returned.
    n = 10
    p = gapwise.ising(h=[0.1 * ((i % 3) - 1) for i in range(n)], J={(i, (i + 1) % n): -1.0 + 0.1 * i for i in range(n)})
    ticks, stop = [0], threading.Event()

    def count():
        while not stop.is_set():
            ticks[0] += 1
            time.sleep(0.002)

    worker = threading.Thread(target=count)
    worker.start()
    time.sleep(0.01)
    start_ticks, t0 = ticks[0], time.perf_counter()
    gapwise.anneal(p, LINEAR, 20, check=False, tolerance=1e-10)  # ~1 s on an idle 2-core machine
    elapsed, during = time.perf_counter() - t0, ticks[0] - start_ticks
    stop.set()
    worker.join()
    assert elapsed > 0.2, "the call was too short to tell"  # 100 free ticks at least
    # At 2 ms a tick the thread manages elapsed/0.002 ticks when free; a held GIL allows ~1.
    assert during > 0.2 * elapsed / 0.002, f"{during} ticks in {elapsed:.2f} s"
