"""Ctrl-C and progress of the module's long calls.

What a Python user expects of a long-running extension call (common practice,
as the Python C-API documentation asks of extensions: PyErr_CheckSignals during
long computations): SIGINT raises KeyboardInterrupt promptly even though the
computation runs with the GIL released, the SIGINT handler is left as it was,
and later calls work. The signal is sent by a timer thread, as a terminal would
send it to the process; the bounds below are generous for a shared 2-core machine.
"""
import os
import signal
import threading
import time

import pytest

import gapwise

LINEAR = {"scales": {"kind": "linear", "a_max_ghz": 5.0, "b_max_ghz": 5.0},
          "path": {"time": "fraction", "duration_ns": 10.0, "points": [[0.0, 0.0], [1.0, 1.0]]}}


def chain(n):
    # Real-valued couplings and fields, as users run (not the easiest uniform ring).
    return gapwise.ising(h=[0.1 * ((i % 3) - 1) for i in range(n)],
                         J={(i, (i + 1) % n): -1.0 + 0.1 * i for i in range(n)})


def interrupted_after(call, delay=0.4):
    """Seconds from the SIGINT to the KeyboardInterrupt of `call` (which gets a progress callable)."""
    seen = []
    sent = []

    def send():
        sent.append(time.perf_counter())
        os.kill(os.getpid(), signal.SIGINT)

    timer = threading.Timer(delay, send)
    timer.start()
    try:
        with pytest.raises(KeyboardInterrupt):
            call(seen.append)
    finally:
        timer.cancel()
    assert sent, "the call ended before the signal was sent"
    return time.perf_counter() - sent[0], seen


def test_ctrl_c_stops_a_long_anneal():
    # Uninterrupted this anneal runs for tens of seconds (12 qubits, 300 ns at 1e-10: a few per cent
    # of the split propagator's first pass is done when the signal comes).
    before = signal.getsignal(signal.SIGINT)
    latency, seen = interrupted_after(
        lambda cb: gapwise.anneal(chain(12), LINEAR, 300, tolerance=1e-10, check=False, progress=cb))
    assert latency < 3.0, f"KeyboardInterrupt came {latency:.2f} s after SIGINT"  # measured 0.02 to 0.3 s
    assert seen[-1]["stage"] == "interrupted"
    assert all(d["stage"] != "done" for d in seen)
    assert signal.getsignal(signal.SIGINT) is before
    # The module is usable afterwards, and Ctrl-C still works the ordinary way.
    r = gapwise.anneal(chain(3), LINEAR, 5)
    assert 0.0 < r["ground_probability"] <= 1.0
    with pytest.raises(KeyboardInterrupt):
        os.kill(os.getpid(), signal.SIGINT)
        time.sleep(1.0)


def test_ctrl_c_stops_a_threaded_duration_study():
    # Anneals run on two threads; whichever thread the signal lands on, all stop.
    latency, _ = interrupted_after(
        lambda cb: gapwise.duration_study(chain(11), LINEAR, [100, 200, 400, 800], threads=2, search=False,
                                          tolerance=1e-9, progress=cb), delay=0.8)
    assert latency < 3.0, f"KeyboardInterrupt came {latency:.2f} s after SIGINT"


def test_progress_reports_and_leaves_results_unchanged():
    p = chain(8)
    seen = []
    quiet = gapwise.duration_study(p, LINEAR, [2, 5, 10, 20], search=False)
    loud = gapwise.duration_study(p, LINEAR, [2, 5, 10, 20], search=False, progress=seen.append)
    # Bit for bit: the hooks only observe.
    assert list(loud["points"]["ground_probability"]) == list(quiet["points"]["ground_probability"])
    assert seen, "no progress reported"
    assert seen[-1]["stage"] == "done" and seen[-1]["fraction"] == 1.0
    for d in seen:
        assert set(d) == {"call", "stage", "done", "total", "fraction", "seconds"}
        assert d["call"] == "duration_study"
        assert d["fraction"] == -1.0 or 0.0 <= d["fraction"] <= 1.0
    stages = [d["stage"] for d in seen]
    assert any(s.startswith("gap search") for s in stages) or "anneals" in stages or stages == ["done"]


def test_progress_sees_a_long_anneal_advance():
    seen = []
    # About 1.5 s on an idle machine (12 qubits, 40 ns; the revised step controller
    # finishes 10 qubits at 20 ns in 0.3 s, too close to the 0.2 s report interval).
    gapwise.anneal(chain(12), LINEAR, 40, tolerance=1e-9, check=False, progress=seen.append)
    inside = [d for d in seen if d["stage"] != "done"]
    assert inside, "a call of about a second reported nothing while it ran"
    assert all(d["stage"].startswith("anneal") and 0.0 <= d["fraction"] <= 1.0 for d in inside)
    assert seen[-1]["stage"] == "done"


def test_an_exception_in_the_progress_callable_stops_the_call():
    class Enough(Exception):
        pass

    def stop(info):
        raise Enough(info["stage"])

    t0 = time.perf_counter()
    with pytest.raises(Enough):
        gapwise.anneal(chain(12), LINEAR, 300, tolerance=1e-10, check=False, progress=stop)
    assert time.perf_counter() - t0 < 5.0


def test_progress_true_writes_a_line_to_stderr(capfd):
    gapwise.gap_scan(chain(6), LINEAR, progress=True)
    err = capfd.readouterr().err
    assert "gap_scan: done" in err and err.endswith("\n")


def test_a_progress_that_is_not_callable_is_refused():
    with pytest.raises(TypeError, match="progress must be None, True or a callable"):
        gapwise.anneal(chain(3), LINEAR, 5, progress="yes")
