#!/usr/bin/env python3
"""Worked example 07, run entirely from Python through the gapwise module:
how strong must a tie-breaking bias be for a short anneal to find the answer?

Six lamps on a roundabout (qubit i = lamp i, bit 1 = bright). Neighbours should
not match (glare when both are bright, dark gaps when both are dim): an
antiferromagnetic ring with real-valued couplings. Both alternating patterns
satisfy every pair, so without a bias the problem has two answers. The council
wants lamp 0 (by the school) bright, and adds a bias h on it (h > 0 favours bit 1).
For each h the study takes the minimum gap, the shortest anneal that reaches
p >= 0.99 (with the Landau-Zener prediction beside it) and 1 - p of a 10 ns anneal.

Usage: 07-python-field-study.py [FIGURE_DIR]   (needs PYTHONPATH=build/python)
The default FIGURE_DIR is the figures/ folder beside this script.
"""
import pathlib
import sys

import numpy as np

import gapwise

RING_COUPLINGS = [1.0, 0.8, 1.1, 0.9, 1.0, 0.7]  # J between lamp i and lamp i+1 (lamp 5 -> 0)
BIASES = [0.03, 0.05, 0.08, 0.13, 0.2, 0.32, 0.5, 0.8]
HERE = pathlib.Path(__file__).resolve().parent
SCHEDULE = HERE.parents[1] / "schedules" / "linear.toml"  # A = 5 (1 - s), B = 5 s GHz
TARGET = 0.99
FIXED_NS = 10.0


def roundabout(h):
    J = {(i, (i + 1) % 6): RING_COUPLINGS[i] for i in range(6)}
    return gapwise.ising(h=[h, 0, 0, 0, 0, 0], J=J, labels=[f"lamp{i}" for i in range(6)],
                         description=f"six lamps on a roundabout, bias {h} on lamp 0")


def field_study(biases=BIASES):
    """One row per bias: h, gap (GHz), s*, needed duration simulated and predicted (ns), 1 - p at FIXED_NS."""
    schedule = gapwise.schedule(SCHEDULE)
    rows = []
    for h in biases:
        p = roundabout(h)
        gap = gapwise.gap_scan(p, schedule)
        study = gapwise.duration_study(p, schedule, target=TARGET)
        fixed = gapwise.anneal(p, schedule, FIXED_NS, check=False)
        lz = study["predictions"]["landau_zener"]
        rows.append({
            "h": h,
            "gap_ghz": gap["gap_ghz"],
            "s_star": gap["s_star"],
            "needed_ns": study["duration_needed"]["simulated_duration_ns"],
            "lz_needed_ns": lz["duration_for_target_ns"] if lz["applicable"] else float("nan"),
            "one_minus_p_fixed": 1.0 - fixed["ground_probability"],
        })
    return rows


def plot(rows, out_dir):
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import matplotlib.ticker
    h = np.array([r["h"] for r in rows])
    col = {k: np.array([r[k] for r in rows]) for k in rows[0]}
    fig, ax = plt.subplots(1, 3, figsize=(12.5, 4.0), constrained_layout=True)
    ax[0].loglog(h, col["gap_ghz"], "o-", color="C0", label=r"$\Delta_{\min}$ (gap scan)")
    ax[0].set_xlabel("bias $h$ on lamp 0 (problem units)")
    ax[0].set_ylabel(r"minimum gap $\Delta_{\min}$ (GHz)")
    ax[0].set_title("(a) minimum gap")
    ax[0].legend(loc="upper left", frameon=False)
    ax[1].loglog(h, col["needed_ns"], "o-", color="C1", label="simulated (bisection)")
    ax[1].loglog(h, col["lz_needed_ns"], "s--", color="C2", mfc="none", label="Landau-Zener prediction")
    ax[1].set_xlabel("bias $h$ on lamp 0 (problem units)")
    ax[1].set_ylabel(r"anneal time for $p \geq 0.99$ (ns)")
    ax[1].set_title(r"(b) duration needed, $p^* = 0.99$")
    ax[1].legend(loc="upper right", frameon=False)
    ax[2].semilogy(h, col["one_minus_p_fixed"], "o-", color="C3", label=r"$t_f$ = 10 ns")
    ax[2].axhline(1 - TARGET, color="0.5", lw=0.8, ls=":")
    ax[2].text(h[-1], (1 - TARGET) * 1.25, r"$1 - p^*$", ha="right", va="bottom", color="0.4")
    ax[2].set_xscale("log")
    ax[2].set_xlabel("bias $h$ on lamp 0 (problem units)")
    ax[2].set_ylabel(r"failure probability $1 - p$")
    ax[2].set_title("(c) one 10 ns anneal")
    ax[2].legend(loc="lower left", frameon=False)
    ticks = [0.03, 0.05, 0.1, 0.2, 0.5, 0.8]
    for a in ax:
        a.set_xticks(ticks)
        a.set_xticklabels([f"{t:g}" for t in ticks])
        a.xaxis.set_minor_formatter(matplotlib.ticker.NullFormatter())
    fig.suptitle("Six lamps on a roundabout: a stronger tie-break bias opens the gap and shortens the anneal "
                 "(linear schedule, 5 GHz)", fontsize=10)
    out_dir.mkdir(parents=True, exist_ok=True)
    path = out_dir / "07-field-study.png"
    fig.savefig(path, dpi=110)
    plt.close(fig)
    return path


def main():
    out_dir = pathlib.Path(sys.argv[1]) if len(sys.argv) > 1 else HERE / "figures"
    rows = field_study()
    print("| h | gap (GHz) | s* | needed (ns) | Landau-Zener (ns) | 1 - p at 10 ns |")
    print("|---|---|---|---|---|---|")
    for r in rows:
        print(f"| {r['h']:g} | {r['gap_ghz']:.4g} | {r['s_star']:.3f} | {r['needed_ns']:.4g} | "
              f"{r['lz_needed_ns']:.4g} | {r['one_minus_p_fixed']:.3g} |")
    print("figure:", plot(rows, out_dir))


if __name__ == "__main__":
    main()
