"""The module and the command line give the same numbers, bit for bit.

A parameter loop over the strength of a field on a five-qubit problem with
real-valued couplings (and one QUBO-derived problem): each instance is written
to a problem file and run by `gapwise anneal --json`, `gapwise gap --json` and
`gapwise durations --out FILE.h5`; the module runs the same instance built
from Python objects. Both call the same library with the same options, so every
number must be identical (==, not approx): a difference means the two paths
have drifted apart.
"""
import json
import subprocess

import h5py
import numpy as np
import pytest

import gapwise

# An invented instance: a five-qubit chain with a chord, mixed-sign real couplings.
COUPLINGS = {(0, 1): -0.8, (1, 2): 0.55, (2, 3): -1.0, (3, 4): 0.35, (0, 3): 0.7}
FIELD_PATTERN = np.array([1.0, 0.0, -0.5, 0.0, 0.25])
FIELD_STRENGTHS = [0.0, 0.05, 0.3, 0.9]


def problem_toml(h):
    lines = ['format = "gapwise-problem"', "format_version = 1", 'kind = "ising"', "qubits = 5",
             "fields = [" + ", ".join(repr(float(x)) for x in h) + "]",
             "couplings = [" + ", ".join(f"[{i}, {j}, {v!r}]" for (i, j), v in COUPLINGS.items()) + "]"]
    return "\n".join(lines) + "\n"


def run_json(exe, *args):
    out = subprocess.run([exe, *map(str, args), "--json", "-q"], capture_output=True, text=True)
    assert out.returncode == 0, out.stderr
    return json.loads(out.stdout)


def same(a, b):
    """Exact equality that counts NaN == NaN (not applicable in both)."""
    a, b = np.asarray(a), np.asarray(b)
    return a.shape == b.shape and bool(np.all((a == b) | (np.isnan(a) & np.isnan(b))))


@pytest.mark.parametrize("strength", FIELD_STRENGTHS)
def test_field_loop_matches_the_command_line(tmp_path, gapwise_exe, source_dir, strength):
    h = strength * FIELD_PATTERN
    path = tmp_path / "chain.toml"
    path.write_text(problem_toml(h))
    schedule = source_dir / "schedules" / "hardware-like.toml"
    p = gapwise.ising(h=h, J=COUPLINGS)

    # anneal: p, the convergence re-run and the norm drift
    cli = run_json(gapwise_exe, "anneal", path, schedule, "-d", 12)
    mod = gapwise.anneal(p, schedule, 12)
    for key in ("ground_probability", "convergence_delta_p", "norm_drift", "ground_energy", "steps"):
        assert mod[key] == cli[key], key
    assert [o["probability"] for o in mod["outcomes"]] == [o["probability"] for o in cli["outcomes"]]

    # gap scan
    cli = run_json(gapwise_exe, "gap", path, schedule)
    mod = gapwise.gap_scan(p, schedule)
    for key in ("gap_ghz", "s_star", "s_star_uncertainty", "adiabatic_time_ns", "sector", "definition"):
        assert mod[key] == cli[key], key

    # duration study through the HDF5 result
    out = tmp_path / "chain.h5"
    run = subprocess.run([gapwise_exe, "durations", str(path), str(schedule), "-d", "2,6,20", "--out", str(out), "-q"],
                         capture_output=True, text=True)
    assert run.returncode == 0, run.stderr
    mod = gapwise.duration_study(p, schedule, [2, 6, 20])
    with h5py.File(out, "r") as f:
        pts = f["/durations/points"]
        for key in ("duration_ns", "ground_probability", "tts_ns", "repetitions", "tts_case", "on_grid",
                    "p_landau_zener", "p_adiabatic"):
            assert same(mod["points"][key], pts[key][()]), key
        assert same(mod["grid_ns"], f["/durations/grid_ns"][()])
        assert mod["tts_optimum"]["duration_ns"] == f["/durations/tts_optimum"].attrs["duration_ns"]
        assert mod["duration_needed"]["status"] == f["/durations/duration_needed"].attrs["status"]
        assert mod["predictions"]["gap_ghz"] == f["/durations/predictions"].attrs["gap_ghz"]


def test_qubo_instance_matches_the_command_line(gapwise_exe, source_dir):
    path = source_dir / "data-samples" / "meeting-slots-qubo.toml"
    schedule = source_dir / "schedules" / "linear.toml"
    p = gapwise.problem(path)
    cli = run_json(gapwise_exe, "anneal", path, schedule, "-d", 7.5)
    mod = gapwise.anneal(p, schedule, 7.5)
    assert mod["ground_probability"] == cli["ground_probability"]
    assert mod["ground_energy"] == cli["ground_energy"]


@pytest.mark.parametrize("cost", ["total", "added"])
def test_pause_map_matches_the_command_line(tmp_path, gapwise_exe, source_dir, cost):
    h = 0.3 * FIELD_PATTERN
    path = tmp_path / "chain.toml"
    path.write_text(problem_toml(h))
    schedule = source_dir / "schedules" / "linear.toml"
    out = tmp_path / "pause.h5"
    run = subprocess.run([gapwise_exe, "pause-map", str(path), str(schedule), "-d", "4", "--at", "0.3,0.55,0.8",
                          "--pause-ns", "0,1,3", "--cost", cost, "--out", str(out), "-q"], capture_output=True, text=True)
    assert run.returncode == 0, run.stderr
    mod = gapwise.pause_map(gapwise.ising(h=h, J=COUPLINGS), schedule, 4, [0.3, 0.55, 0.8], [0, 1, 3], cost=cost)
    with h5py.File(out, "r") as f:
        g = f["/pause_map"]
        assert mod["ground_probability"].shape == (3, 3)
        for key in ("pause_s", "pause_ns", "ground_probability", "tts_ns", "total_ns", "norm_drift",
                    "reference_ground_probability", "reference_total_ns"):
            assert same(mod[key], g[key][()]), key
        assert mod["cost"] == g.attrs["cost"]
    # A pause changes p (the map is not flat), and with zero pause every location equals the reference.
    assert np.ptp(mod["ground_probability"]) > 1e-4
    assert same(mod["ground_probability"][:, 0], np.full(3, mod["reference_ground_probability"][0]))


def read_group(g):
    """An HDF5 group as nested dicts (datasets as arrays, strings decoded), attributes merged in."""
    out = {k: (v.decode() if isinstance(v, bytes) else v) for k, v in g.attrs.items()
           if k not in ("units", "description", "nan_meaning", "inf_meaning", "flag_values", "flag_meanings")}
    for k, v in g.items():
        if isinstance(v, h5py.Group):
            out[k] = read_group(v)
        elif v.dtype.kind in "OS":
            out[k] = list(v.asstr()[()])
        else:
            out[k] = v[()]
    return out


@pytest.mark.slow
def test_diagnosis_matches_the_command_line(tmp_path, gapwise_exe, source_dir):
    # The six-guest seating problem (a field, mixed couplings); two durations and a
    # small control-error Monte Carlo, so every part of /diagnosis is compared.
    problem = source_dir / "data-samples" / "dinner-tables.toml"
    schedule = source_dir / "schedules" / "linear.toml"
    out = tmp_path / "diag.h5"
    run = subprocess.run([gapwise_exe, "diagnose", str(problem), str(schedule), "-d", "4,12", "--samples", "4",
                          "--out", str(out), "-q"], capture_output=True, text=True)
    assert run.returncode == 0, run.stderr
    mod = gapwise.diagnose(problem, schedule, [4, 12], samples=4)
    with h5py.File(out, "r") as f:
        ref = read_group(f["/diagnosis"])
    assert len(mod["runs"]) == 2 and len(mod["crossings"]["s_star"]) >= 1

    def compare(a, b, where):
        if isinstance(b, dict):
            for k in b:
                if k == "runs":
                    for r, run_ in enumerate(a["runs"]):
                        compare(run_, b["runs"][str(r)], f"{where}/runs/{r}")
                    continue
                if k.startswith("level") or k in ("format", "format_version", "DIMENSION_LIST", "CLASS", "NAME",
                                                  "REFERENCE_LIST"):
                    continue
                assert k in a, f"{where}/{k} missing from the module's result"
                compare(a[k], b[k], f"{where}/{k}")
        elif isinstance(b, list):
            assert list(a) == b, where
        elif isinstance(b, str):
            assert a == b, where
        else:
            assert same(a, b), where

    compare(mod, ref, "/diagnosis")


def test_embedding_cost_matches_the_command_line(tmp_path, gapwise_exe, source_dir):
    # The garden-beds QUBO on a four-qubit square (one chain of two), three chain strengths.
    problem = source_dir / "data-samples" / "garden-beds-qubo.toml"
    emb = source_dir / "data-samples" / "garden-beds-square-embedding.toml"
    schedule = source_dir / "schedules" / "linear.toml"
    out = tmp_path / "embed.h5"
    run = subprocess.run([gapwise_exe, "embed-cost", str(problem), str(emb), str(schedule), "--strengths", "0.5,1,2",
                          "--search-durations", "2,8,32", "--out", str(out), "-q"], capture_output=True, text=True)
    assert run.returncode == 0, run.stderr
    mod = gapwise.embed_cost(problem, emb, schedule, strengths=[0.5, 1, 2], search_durations=[2, 8, 32])
    with h5py.File(out, "r") as f:
        g = f["/embedding"]
        for key in ("duration_ns", "chain_coupling_bound", "best_chain_coupling", "price_of_embedding", "best_index"):
            assert same(mod[key], g.attrs[key]), key
        assert mod["price_relation"] == g.attrs["price_relation"]
        for key in ("min_gap_ghz", "s_star", "ground_probability", "needed_ns", "needed_bound"):
            assert same(mod["logical"][key], g["logical"].attrs[key]), key
        for key in ("chain_coupling", "scale", "min_gap", "s_star", "p_logical", "p_physical", "broken_chain_share",
                    "needed_duration", "needed_bound", "ground_intact"):
            assert same(mod["scan"][key], g["scan"][key][()]), key
    assert len(mod["scan"]["p_logical"]) >= 3
