"""The demo: run the packaged survey-wing campaign, rank it, plot the shortlist's polars.

The campaign file ships inside the package (``wakerank/data/demo.toml``; catalogs/demo.toml
in the source tree is an identical copy, checked by a test), so the demo works right after
``pip install``.
"""

from __future__ import annotations

from dataclasses import dataclass
from importlib import resources
from pathlib import Path

import polars as pl

from wakerank.campaign import LoadedCampaign, load_campaign, values_of
from wakerank.catalog import open_catalog
from wakerank.ranking import rank
from wakerank.session import RunSummary, run_campaign

#: Reynolds number at which the demo ranks and plots (the cruise condition of the scenario).
DEMO_REYNOLDS = 8e5
#: Sections in the printed shortlist and in the plot.
DEMO_TOP = 5


@dataclass(frozen=True)
class DemoResult:
    """Where the demo put everything, and what it found."""

    out_dir: Path
    catalog_dir: Path
    campaign_file: Path
    shortlist_file: Path
    plot_file: Path
    shortlist: pl.DataFrame
    summary: RunSummary
    design_cl: list[float]


def demo_campaign_text() -> str:
    """Text of the packaged demo campaign."""
    return resources.files("wakerank").joinpath("data/demo.toml").read_text(encoding="utf-8")


def run_demo(
    out_dir: str | Path = "wakerank-demo", workers: int | None = None, progress: bool = True
) -> DemoResult:
    """Run the demo campaign into `out_dir` (resumable like any run) and plot its shortlist."""
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    campaign_file = out / "demo.toml"
    text = demo_campaign_text()
    if not campaign_file.exists() or campaign_file.read_text(encoding="utf-8") != text:
        campaign_file.write_text(text, encoding="utf-8")
    loaded: LoadedCampaign = load_campaign(campaign_file)
    catalog_dir = out / "catalog"
    summary = run_campaign(loaded, catalog_dir, workers=workers, progress=progress)
    design = loaded.campaign.design
    assert design is not None
    design_cl = values_of(design.cl)
    shortlist = rank(
        catalog_dir,
        design_cl,
        reynolds=DEMO_REYNOLDS,
        min_thickness=design.min_thickness,
        max_abs_cm=design.max_abs_cm,
        min_stall_margin=design.min_stall_margin,
        top=DEMO_TOP,
    )
    shortlist_file = out / "shortlist.parquet"
    shortlist.write_parquet(shortlist_file)
    plot_file = out / "shortlist-drag-polars.png"
    plot_shortlist_polars(catalog_dir, shortlist, design_cl, plot_file)
    return DemoResult(
        out, catalog_dir, campaign_file, shortlist_file, plot_file, shortlist, summary, design_cl
    )


def plot_shortlist_polars(
    catalog_dir: Path, shortlist: pl.DataFrame, design_cl: list[float], path: Path
) -> None:
    """Drag polars (cd against cl) of the shortlisted sections at their ranked condition; the
    lines break where an angle did not converge."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    points = open_catalog(catalog_dir).points
    fig, ax = plt.subplots(figsize=(7.5, 5.5), dpi=120)
    conditions = ""
    for row in shortlist.iter_rows(named=True):
        polar = (
            points.filter(
                (pl.col("section_id") == row["section_id"])
                & (pl.col("condition_id") == row["condition_id"])
            )
            .sort("alpha_deg")
            .with_columns(  # NaN where not converged: the line breaks at every gap
                [
                    pl.when(pl.col("converged")).then(pl.col(c)).otherwise(float("nan")).alias(c)
                    for c in ("cl", "cd")
                ]
            )
            .collect()
        )
        ax.plot(
            polar["cd"].to_numpy(),
            polar["cl"].to_numpy(),
            marker="o",
            markersize=3,
            label=f"#{row['rank']} {row['label']} (t/c {row['thickness']:.2f})",
        )
        n_text = f"N = {row['n_factor']:g}" if row["n_factor"] is not None else "Tu set"
        conditions = (
            f"Re = {row['reynolds']:.3g}, M = {row['mach']:g}, "
            f"{row['transition']} transition ({n_text})"
        )
    for target in design_cl:
        ax.axhline(target, color="grey", linestyle="--", linewidth=0.8)
    ax.set_xlabel("section drag coefficient cd (-)")
    ax.set_ylabel("section lift coefficient cl (-)")
    ax.set_title(
        f"Shortlist drag polars, design cl = {', '.join(f'{c:g}' for c in design_cl)}\n{conditions}"
    )
    ax.grid(True, alpha=0.3)
    if shortlist.height:
        ax.legend(fontsize=8, loc="lower right")
    else:
        ax.text(0.5, 0.5, "no section met the constraints", transform=ax.transAxes, ha="center")
    fig.tight_layout()
    fig.savefig(path)
    plt.close(fig)


__all__ = ["DEMO_REYNOLDS", "DemoResult", "demo_campaign_text", "plot_shortlist_polars", "run_demo"]
