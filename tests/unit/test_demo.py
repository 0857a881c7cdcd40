"""`wakerank demo` end to end with the stand-in core: shortlist, plot, paths printed."""

from __future__ import annotations

import polars as pl
from campaign_fakes import install
from wakerank.demo import run_demo


def test_demo_writes_catalog_shortlist_and_plot(tmp_path, monkeypatch):
    install(monkeypatch)
    result = run_demo(tmp_path / "demo", workers=2, progress=False)
    assert result.summary.complete and result.summary.cases > 0
    assert result.shortlist.height > 0
    assert (result.shortlist["thickness"] >= 0.12).all()  # the spar constraint of the scenario
    assert pl.read_parquet(result.shortlist_file).equals(result.shortlist)
    png = result.plot_file.read_bytes()
    assert png[:8] == b"\x89PNG\r\n\x1a\n" and len(png) > 10_000
    # a second demo run resumes: nothing is recomputed
    again = run_demo(tmp_path / "demo", workers=2, progress=False)
    assert again.summary.computed_cases == 0
