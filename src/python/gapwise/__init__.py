"""gapwise from Python: exact closed-system simulation of transverse-field Ising anneals.

The same library calls as the command line, returning NumPy arrays and plain
dicts whose keys are the names of the command's HDF5 datasets and attributes.

    import gapwise
    p = gapwise.ising(h=[0.1, 0, 0], J={(0, 1): 1.0, (1, 2): 1.0, (0, 2): 1.0})
    s = gapwise.schedule("schedules/linear.toml")
    r = gapwise.anneal(p, s, duration_ns=20)
    r["ground_probability"], r["trace"]["t"], r["trace"]["ground_probability"]

Problems and schedules may be given as Problem/Schedule objects, file paths, or
dicts with the keys of the TOML files (rendered to TOML and read by the same
reader, so bad input raises gapwise.InputError with the command line's message).
Computation releases the GIL: other Python threads run meanwhile.
Ctrl-C (SIGINT) stops a running call within a fraction of a second and raises
KeyboardInterrupt; nothing of the call is kept. Every computing function takes
progress=: None (quiet), True (a line on stderr, rewritten in place), or a
callable given one dict {"call", "stage", "done", "total", "fraction", "seconds"}
a few times a second and once more at the end with stage "done" (or "interrupted");
fraction is -1 when the total is not known. An exception it raises stops the call
and is re-raised.
Units: durations in ns, energies in GHz (H in GHz; d psi/dt = -i 2 pi H psi).
"""
import math
import numbers
import os
import re

from ._core import InputError, Problem, Schedule  # noqa: F401
from . import _core

__all__ = ["InputError", "Problem", "Schedule", "problem", "ising", "qubo", "schedule",
           "anneal", "gap_scan", "duration_study", "pause_map", "diagnose", "embedding", "embed_cost"]

_BARE_KEY = re.compile(r"^[A-Za-z0-9_-]+$")


def _fail(name, key, problem, fix):
    """InputError with the command line's layout: 'name: key 'k': problem. Fix: fix'."""
    msg = f"{name}: key '{key}': {problem}. Fix: {fix}" if key else f"{name}: {problem}. Fix: {fix}"
    err = InputError(msg)
    err.file, err.line, err.column, err.key, err.problem, err.fix = name, 0, 0, key, problem, fix
    return err


def _toml_key(k, name, where):
    if not isinstance(k, str):
        raise _fail(name, where, f"key {k!r} is not a string", "use the key names of the TOML file")
    return k if _BARE_KEY.match(k) else '"' + k.replace("\\", "\\\\").replace('"', '\\"') + '"'


def _toml_value(v, name, key):
    """One value as TOML text (inline arrays and tables)."""
    try:
        import numpy as np
        if isinstance(v, np.ndarray):
            v = v.tolist()
        elif isinstance(v, np.generic):
            v = v.item()
    except ImportError:  # pragma: no cover - numpy is a dependency of the module
        pass
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, numbers.Integral):
        return str(int(v))
    if isinstance(v, numbers.Real):
        x = float(v)
        if math.isnan(x):
            return "nan"
        if math.isinf(x):
            return "inf" if x > 0 else "-inf"
        return repr(x)
    if isinstance(v, str):
        out = ['"']
        for ch in v:
            if ch in '"\\':
                out.append("\\" + ch)
            elif ord(ch) < 0x20 or ord(ch) == 0x7F:
                out.append(f"\\u{ord(ch):04x}")
            else:
                out.append(ch)
        return "".join(out) + '"'
    if isinstance(v, dict):
        items = [f"{_toml_key(k, name, key)} = {_toml_value(x, name, f'{key}.{k}')}" for k, x in v.items()]
        return "{ " + ", ".join(items) + " }"
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_toml_value(x, name, f"{key}[{i}]") for i, x in enumerate(v)) + "]"
    raise _fail(name, key, f"a value of type {type(v).__name__} has no TOML form",
                "give numbers, strings, booleans, lists or dicts (NumPy arrays are fine)")


def _render_toml(d, name):
    lines = []
    for k, v in d.items():
        lines.append(f"{_toml_key(k, name, str(k))} = {_toml_value(v, name, str(k))}")
    return "\n".join(lines) + "\n"


def _pair_list(value, name, key, diagonal_allowed):
    """Couplings or QUBO terms as [[i, j, value], ...] from a dict {(i, j): v}, an (n, n)
    array (x^T M x convention: entry (i, j) and (j, i) add up) or a list as in the file."""
    if isinstance(value, dict):
        out = []
        for pair, v in value.items():
            if not (isinstance(pair, tuple) and len(pair) == 2):
                raise _fail(name, key, f"dict key {pair!r} is not a pair (i, j)",
                            "write {(i, j): value, ...} with qubit indices i, j")
            out.append([pair[0], pair[1], v])
        return out
    # Only a NumPy array is read as a matrix; a list keeps the file's meaning
    # ([[i, j, value], ...]), so that three couplings of a 3-qubit problem are
    # never mistaken for a 3 x 3 matrix.
    import numpy as np
    if not isinstance(value, np.ndarray):
        return value
    arr = value
    if arr.ndim == 2 and arr.shape[0] == arr.shape[1] and arr.shape[0] > 0 and arr.dtype.kind in "iuf":
        n = arr.shape[0]
        out = []
        for i in range(n):
            if arr[i, i] != 0:
                if not diagonal_allowed:
                    raise _fail(name, f"{key}[{i}][{i}]", f"diagonal entry {float(arr[i, i])!r} in the coupling matrix",
                                "put fields in h (a spin coupled to itself is a constant); the diagonal must be 0")
                out.append([i, i, float(arr[i, i])])
            for j in range(i + 1, n):
                v = float(arr[i, j]) + float(arr[j, i])
                if v != 0.0:
                    out.append([i, j, v])
        return out
    return value


def _matrix(m, key):
    import numpy as np
    try:
        arr = np.asarray(m, dtype=float)
    except (TypeError, ValueError):
        arr = None
    if arr is None or arr.ndim != 2 or arr.shape[0] != arr.shape[1]:
        shape = "not numeric" if arr is None else f"of shape {arr.shape}"
        raise _fail("<problem dict>", key, f"the matrix is {shape}",
                    "give an (n, n) array (entries (i, j) and (j, i) add up) or a dict {(i, j): value}")
    return arr


def _problem_from_dict(d, name="<problem dict>"):
    d = dict(d)
    if "fields" in d:
        d["fields"] = _as_list(d["fields"])
    if "couplings" in d:
        d["couplings"] = _pair_list(d["couplings"], name, "couplings", False)
    if "terms" in d:
        d["terms"] = _pair_list(d["terms"], name, "terms", True)
    return _core._problem_from_text(_render_toml(d, name), name, True)


def _as_list(v):
    try:
        import numpy as np
        if isinstance(v, np.ndarray):
            return v.tolist()
    except ImportError:  # pragma: no cover
        pass
    return v


def _stderr_progress(info):
    """progress=True: one line on stderr, rewritten in place, ended at "done"."""
    import sys
    frac = info["fraction"]
    where = f"{100 * frac:5.1f} %" if frac >= 0 else f"{info['done']:.0f} done"
    end = "\n" if info["stage"] in ("done", "interrupted") else ""
    sys.stderr.write(f"\r{info['call']}: {info['stage']}: {where}, {info['seconds']:.1f} s\033[K{end}")
    sys.stderr.flush()


def _progress_arg(progress):
    if progress is None or progress is False:
        return None
    if progress is True:
        return _stderr_progress
    if callable(progress):
        return progress
    raise TypeError(f"progress must be None, True or a callable taking one dict, not {type(progress).__name__}")


def problem(source):
    """A Problem from a file path (str or os.PathLike), a Problem (returned as is), or a
    dict with the keys of the problem file (kind, qubits, fields, couplings, terms,
    offset, labels, description). In a dict, `couplings` (Ising) and `terms` (QUBO)
    are lists [[i, j, value], ...] as in the file, or {(i, j): value}, or an (n, n)
    NumPy array (entries (i, j) and (j, i) add up); `fields` may be an array."""
    if isinstance(source, Problem):
        return source
    if isinstance(source, (str, os.PathLike)):
        return _core._problem_from_file(os.fspath(source))
    if isinstance(source, dict):
        return _problem_from_dict(source)
    raise TypeError(f"a problem is a path, a dict or a gapwise.Problem, not {type(source).__name__}")


def ising(h=None, J=None, offset=0.0, qubits=None, labels=None, description=None):
    """An Ising problem E(s) = sum_i h_i s_i + sum_{i<j} J_ij s_i s_j + offset.
    h: sequence or array of fields; J: {(i, j): J_ij} or an (n, n) array read as
    the pairs i < j: entries (i, j) and (j, i) add up, so give an upper triangle
    (a symmetric matrix counts each pair twice); qubits: defaults to len(h) or the size of J."""
    n = qubits
    if n is None and h is not None:
        n = len(h)
    if n is None and J is not None and not isinstance(J, dict):
        n = len(J)
    if n is None and isinstance(J, dict) and J:
        n = 1 + max(max(int(i), int(j)) for i, j in J)
    d = {"kind": "ising"}
    if n is not None:
        d["qubits"] = n
    if description is not None:
        d["description"] = description
    if labels is not None:
        d["labels"] = list(labels)
    if h is not None:
        d["fields"] = _as_list(h)
    if J is not None:
        d["couplings"] = J if isinstance(J, dict) else _matrix(J, "couplings")
    if offset:
        d["offset"] = offset
    return _problem_from_dict(d)


def qubo(Q, offset=0.0, qubits=None, labels=None, description=None):
    """A QUBO E(x) = sum_{i<=j} Q_ij x_i x_j + offset, converted exactly to Ising as the
    problem reader does. Q: {(i, j): Q_ij} (i == j linear) or an (n, n) array read as
    x^T Q x (entries (i, j) and (j, i) add up)."""
    n = qubits
    if n is None:
        n = (1 + max(max(int(i), int(j)) for i, j in Q)) if isinstance(Q, dict) and Q else (
            None if isinstance(Q, dict) else len(Q))
    d = {"kind": "qubo"}
    if n is not None:
        d["qubits"] = n
    if description is not None:
        d["description"] = description
    if labels is not None:
        d["labels"] = list(labels)
    d["terms"] = Q if isinstance(Q, dict) else _matrix(Q, "terms")
    if offset:
        d["offset"] = offset
    return _problem_from_dict(d)


def schedule(source=None):
    """A Schedule from a file path, a Schedule, or a dict with the keys of the schedule
    file ({"scales": {...}, "path": {...}, "description": ...}); None gives the default
    energy scales (linear, 5 GHz), which only the gap scan can use without a path."""
    if source is None:
        return _core._default_schedule()
    if isinstance(source, Schedule):
        return source
    if isinstance(source, (str, os.PathLike)):
        return _core._schedule_from_file(os.fspath(source))
    if isinstance(source, dict):
        name = "<schedule dict>"
        return _core._schedule_from_text(_render_toml(source, name), name, True)
    raise TypeError(f"a schedule is a path, a dict or a gapwise.Schedule, not {type(source).__name__}")


def anneal(problem_, schedule_, duration_ns=None, *, tolerance=1e-6, propagator="split-auto", trace_points=20,
           top=8, p_only=False, check=True, progress=None):
    """One anneal, as `gapwise anneal` runs it. Returns a dict named as /anneal in the HDF5
    result: ground_probability, duration_ns, norm_drift, convergence_delta_p (NaN with
    check=False), trace {t, s, ground_probability, energy, norm}, final_probabilities,
    ground_states, outcomes, accuracy_ok, ..."""
    return _core._anneal(problem(problem_), schedule(schedule_), duration_ns, tolerance, propagator,
                         trace_points, top, p_only, check, _progress_arg(progress))


def gap_scan(problem_, schedule_=None, *, levels=4, points=26, max_points=3000, s_tolerance=1e-6, sector="auto",
             solver="auto", s_first=None, s_last=None, other_sector=False, level_check=True, progress=None):
    """The minimum-gap search, as `gapwise gap` runs it. Returns a dict named as /gap in the
    HDF5 result: s_star, gap_ghz, definition, curve {s, a, b, energies (points x levels),
    gap, ...}, minima, final_levels, notes."""
    return _core._gap_scan(problem(problem_), schedule(schedule_), levels, points, max_points, s_tolerance,
                           sector, solver, s_first, s_last, other_sector, level_check, _progress_arg(progress))


def duration_study(problem_, schedule_, durations_ns=None, *, target=0.99, tolerance=1e-6, propagator="split-auto",
                   p_only=False, search=True, predictions=True, resolution=5e-3, probes=2, agreement=2.0,
                   threads=0, progress=None):
    """The anneal-time study, as `gapwise durations` runs it. Returns a dict named as
    /durations in the HDF5 result: grid_ns, points {duration_ns, ground_probability,
    tts_ns (inf when p = 0), repetitions, p_landau_zener (NaN: not applicable), ...},
    tts_optimum, duration_needed, predictions."""
    grid = None if durations_ns is None else [float(t) for t in _as_list(durations_ns)]
    return _core._duration_study(problem(problem_), schedule(schedule_), grid, target, tolerance, propagator,
                                 p_only, search, predictions, resolution, probes, agreement, threads,
                                 _progress_arg(progress))


def pause_map(problem_, schedule_, duration_ns, pause_s, pause_ns, *, cost="total", target=0.99, tolerance=1e-6,
              propagator="split-auto", threads=0, progress=None):
    """Ground-state probability over pause location (pause_s, schedule parameter s) x pause
    duration (pause_ns, ns), as `gapwise pause-map` computes it. cost="total": every run takes
    duration_ns and the pause eats into the ramp; "added": the pause adds to it (the unpaused
    reference is stretched to the same total). Returns a dict named as /pause_map in the HDF5
    result: ground_probability, tts_ns, total_ns, norm_drift (len(pause_s) x len(pause_ns)),
    reference_ground_probability, reference_total_ns (one per pause duration), ..."""
    return _core._pause_map(problem(problem_), schedule(schedule_), float(duration_ns),
                            [float(x) for x in _as_list(pause_s)], [float(x) for x in _as_list(pause_ns)], cost,
                            target, tolerance, propagator, threads, _progress_arg(progress))


def diagnose(problem_, schedule_, durations_ns, *, tolerance=1e-6, propagator="split-auto", levels=4, window=5.0,
             target_loss=0.01, check_max_ns=10000.0, samples=100, sigma_h=None, sigma_j=None, relative=False, seed=1,
             control_gaps=True, control_tolerance=None, threads=0, progress=None):
    """Why an anneal loses the ground state, as `gapwise diagnose` computes it (same defaults;
    sigma_h / sigma_j default to 0.03 and are then marked as defaults; samples=0 skips the
    control-error Monte Carlo). Returns a dict named as /diagnosis in the HDF5 result:
    gap_ghz, s_star, spectrum {s, gap}, overlap {...}, crossings {...}, runs (a list, one dict per
    duration: ground_probability, channel_kind, channel_loss, channel_verdict, ...), control {...}."""
    return _core._diagnose(problem(problem_), schedule(schedule_), [float(t) for t in _as_list(durations_ns)],
                           tolerance, propagator, levels, window, target_loss, check_max_ns, samples, sigma_h, sigma_j,
                           relative, seed, control_gaps, control_tolerance, threads, _progress_arg(progress))


def embedding(source):
    """An Embedding from a file path, an Embedding, or a dict with the keys of the embedding
    file (read by the same reader; errors name '<embedding dict>' and the key)."""
    if isinstance(source, _core.Embedding):
        return source
    if isinstance(source, (str, os.PathLike)):
        return _core._embedding_from_file(os.fspath(source))
    if isinstance(source, dict):
        name = "<embedding dict>"
        # The file must say what it is; a dict is one already.
        d = source if "format" in source else {"format": "gapwise-embedding", **source}
        return _core._embedding_from_text(_render_toml(d, name), name)
    raise TypeError(f"an embedding is a path, a dict or a gapwise.Embedding, not {type(source).__name__}")


def embed_cost(problem_, embedding_, schedule_, *, strengths=None, absolute=False, term_limit=None,
               file_term_limit=True, duration_ns=None, search_durations=None, target=0.99, tolerance=1e-6,
               resolution=5e-3, propagator="split-auto", threads=0, progress=None):
    """What an embedding costs, as `gapwise embed-cost` computes it: chain strengths scanned
    (relative to the largest logical term unless absolute=True; default 0.5, 1, 1.5, 2, 3, 4,
    plus the embedding file's own), each physical problem's minimum gap, p_logical at the
    schedule's duration (or duration_ns) and the duration needed for `target` (search grid:
    search_durations, default 13 log-spaced from 1 to 1000 ns), against the logical problem.
    term_limit overrides the file's; file_term_limit=False ignores it. Returns a dict named as
    /embedding in the HDF5 result: price_of_embedding, best_index, logical {...}, scan {...}."""
    grid = None if search_durations is None else [float(t) for t in _as_list(search_durations)]
    values = None if strengths is None else [float(x) for x in _as_list(strengths)]
    return _core._embed_cost(problem(problem_), embedding(embedding_), schedule(schedule_), values, absolute,
                             term_limit, file_term_limit, duration_ns, grid, target, tolerance, resolution,
                             propagator, threads, _progress_arg(progress))
