"""The module's keyword checks and the command line's option checks refuse the
same bad values with the same words: both go through io/value_limits.hpp, and
this test holds them to it. For each pair, the command line's stderr is
"gapwise: error: OPTION: PROBLEM. Fix: FIX" (exit 2) and the module's
gapwise.InputError carries the same PROBLEM and FIX under "gapwise.FUNCTION",
key KEYWORD. The ends of the ranges are accepted on both sides.
"""
import subprocess

import pytest

import gapwise

# (command-line arguments after the inputs, option, module function, keyword arguments, keyword)
CASES = [
    (["anneal", "{P}", "{S}", "--tolerance", "0.5"], "--tolerance", "anneal", {"tolerance": 0.5}, "tolerance"),
    (["anneal", "{P}", "{S}", "--trace-points", "20000"], "--trace-points", "anneal", {"trace_points": 20000},
     "trace_points"),
    (["anneal", "{P}", "{S}", "--top", "1001"], "--top", "anneal", {"top": 1001}, "top"),
    (["durations", "{P}", "{S}", "--target", "1.5"], "--target", "duration_study", {"target": 1.5}, "target"),
    (["durations", "{P}", "{S}", "--threads", "5000"], "--threads", "duration_study", {"threads": 5000},
     "threads"),
    (["durations", "{P}", "{S}", "--probes", "65"], "--probes", "duration_study", {"probes": 65}, "probes"),
    (["durations", "{P}", "{S}", "--resolution", "2"], "--resolution", "duration_study", {"resolution": 2.0},
     "resolution"),
    (["durations", "{P}", "{S}", "--agreement", "0.5"], "--agreement", "duration_study", {"agreement": 0.5},
     "agreement"),
    (["gap", "{P}", "{S}", "--levels", "1"], "--levels", "gap_scan", {"levels": 1}, "levels"),
    (["diagnose", "{P}", "{S}", "-d", "5", "--levels", "65"], "--levels", "diagnose", {"levels": 65}, "levels"),
    (["diagnose", "{P}", "{S}", "-d", "5", "--samples", "-1"], "--samples", "diagnose", {"samples": -1},
     "samples"),
    (["diagnose", "{P}", "{S}", "-d", "5", "--sigma-h", "nan"], "--sigma-h", "diagnose",
     {"sigma_h": float("nan")}, "sigma_h"),
    (["diagnose", "{P}", "{S}", "-d", "5", "--target-loss", "1.5"], "--target-loss", "diagnose",
     {"target_loss": 1.5}, "target_loss"),
    (["diagnose", "{P}", "{S}", "-d", "5", "--check-max-ns", "-1"], "--check-max-ns", "diagnose",
     {"check_max_ns": -1.0}, "check_max_ns"),
    (["diagnose", "{P}", "{S}", "-d", "5", "--window", "0"], "--window", "diagnose", {"window": 0.0}, "window"),
]


def module_call(function, problem, schedule, kwargs):
    f = getattr(gapwise, function)
    if function == "anneal":
        return f(problem, schedule, 5, **kwargs)
    if function == "diagnose":
        return f(problem, schedule, [5], **kwargs)
    return f(problem, schedule, **kwargs)


@pytest.mark.parametrize("args, option, function, kwargs, key", CASES, ids=[c[1] + ":" + c[2] for c in CASES])
def test_module_and_command_line_refuse_alike(gapwise_exe, source_dir, args, option, function, kwargs, key):
    problem = str(source_dir / "data-samples" / "triangle.toml")
    schedule = str(source_dir / "schedules" / "linear.toml")
    cli = subprocess.run([gapwise_exe] + [a.replace("{P}", problem).replace("{S}", schedule) for a in args],
                         capture_output=True, text=True, timeout=60)
    assert cli.returncode == 2, cli.stderr
    with pytest.raises(gapwise.InputError) as err:
        module_call(function, problem, schedule, kwargs)
    e = err.value
    assert (e.file, e.key) == (f"gapwise.{function}", key)
    assert cli.stderr.strip() == f"gapwise: error: {option}: {e.problem}. Fix: {e.fix}"


def test_values_at_the_limits_pass_on_both_sides(gapwise_exe, source_dir):
    # The ends the limits name: tolerance 1e-2 and 1000 outcomes pass (1001 and 0.5 were refused above).
    problem = str(source_dir / "data-samples" / "triangle.toml")
    schedule = str(source_dir / "schedules" / "linear.toml")
    assert gapwise.anneal(problem, schedule, 5, tolerance=1e-2, top=1000)["ground_probability"] > 0
    cli = subprocess.run([gapwise_exe, "anneal", problem, schedule, "--tolerance", "1e-2", "--top", "1000"],
                         capture_output=True, text=True, timeout=60)
    assert cli.returncode == 0, cli.stderr
