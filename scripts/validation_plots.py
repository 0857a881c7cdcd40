"""Plots of the viscous validation cases for docs/validation.md (writes docs/img/*.png).

NACA 0012 at M = 0.15 against Ladson, NASA TM-4074 (1988): drag and lift against α for free
transition (Re 2e6, 3.94e6, 5.97e6) and for transition fixed at x/c = 0.05 (Re 6e6), with
McCroskey's lift-slope fit (AGARD CP-429, 1988). Run: ``python scripts/validation_plots.py``.
"""

from __future__ import annotations

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import polars as pl  # noqa: E402

import wakerank as wr  # noqa: E402
from wakerank.validation import mccroskey_lift_slope, reference_table  # noqa: E402

OUT = Path(__file__).resolve().parents[1] / "docs" / "img"
ALPHAS = [float(a) for a in np.arange(-4.0, 12.5, 1.0)]


def _converged(frame: pl.DataFrame) -> pl.DataFrame:
    return frame.filter(pl.col("converged"))


def free_transition(section: wr.Section) -> None:
    table = reference_table("ladson1988_naca0012_free_transition_M015")
    fig, (ax_cd, ax_cl) = plt.subplots(1, 2, figsize=(11, 4.2))
    for colour, reynolds in zip(("C0", "C1", "C2"), sorted(set(table["Re"].to_list()))):
        ref = table.filter(pl.col("Re") == reynolds)
        got = _converged(wr.analyze(section, alpha_deg=ALPHAS, reynolds=reynolds, mach=0.15))
        label = f"Re {reynolds:.3g}"
        ax_cd.plot(ref["alpha_deg"], ref["cd"], "o", color=colour, label=f"Ladson {label}")
        ax_cd.plot(got["alpha_deg"], got["cd"], "-", color=colour, label=f"wakerank {label}")
        ax_cl.plot(ref["alpha_deg"], ref["cl"], "o", color=colour)
        ax_cl.plot(got["alpha_deg"], got["cl"], "-", color=colour)
    ax_cd.set(xlabel="α (deg)", ylabel="cd", title="NACA 0012, M 0.15, free transition", xlim=(-5, 13))
    ax_cd.set_ylim(0, 0.02)
    ax_cl.set(xlabel="α (deg)", ylabel="cl", title="lift", xlim=(-5, 13))
    ax_cd.legend(fontsize=7)
    for ax in (ax_cd, ax_cl):
        ax.grid(alpha=0.3)
    fig.tight_layout()
    fig.savefig(OUT / "validation_naca0012_free.png", dpi=120)
    plt.close(fig)


def tripped(section: wr.Section) -> None:
    table = reference_table("ladson1988_naca0012_tripped_Re6e6_M015").filter(pl.col("grit") == 80)
    got = _converged(
        wr.analyze(
            section, alpha_deg=ALPHAS, reynolds=6e6, mach=0.15, trip_upper=0.05, trip_lower=0.05
        )
    )
    fig, (ax_cd, ax_cl) = plt.subplots(1, 2, figsize=(11, 4.2))
    ax_cd.plot(table["alpha_deg"], table["cd"], "o", label="Ladson, grit at x/c 0.05")
    ax_cd.plot(got["alpha_deg"], got["cd"], "-", label="wakerank, trips at x/c 0.05")
    ax_cd.plot(got["alpha_deg"], got["cd_squire_young"], "--", label="wakerank, Squire–Young")
    ax_cd.plot(
        got["alpha_deg"], got["cd_friction"] + got["cd_pressure"], ":", label="wakerank, friction + pressure"
    )
    ax_cd.set(xlabel="α (deg)", ylabel="cd", title="NACA 0012, M 0.15, Re 6e6, tripped", xlim=(-5, 13))
    ax_cd.set_ylim(0, 0.02)
    ax_cl.plot(table["alpha_deg"], table["cl"], "o", label="Ladson")
    ax_cl.plot(got["alpha_deg"], got["cl"], "-", label="wakerank")
    slope = mccroskey_lift_slope(6e6, 0.15)
    a = np.array([-4.0, 12.0])
    ax_cl.plot(a, slope * a, "k--", lw=0.8, label=f"McCroskey slope {slope:.4f}/deg")
    ax_cl.set(xlabel="α (deg)", ylabel="cl", title="lift", xlim=(-5, 13))
    for ax in (ax_cd, ax_cl):
        ax.grid(alpha=0.3)
        ax.legend(fontsize=7)
    fig.tight_layout()
    fig.savefig(OUT / "validation_naca0012_tripped.png", dpi=120)
    plt.close(fig)


def main() -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    section = wr.Section.naca("0012")
    free_transition(section)
    tripped(section)
    print(f"wrote {OUT / 'validation_naca0012_free.png'} and {OUT / 'validation_naca0012_tripped.png'}")


if __name__ == "__main__":
    main()
