"""The HTML report is one well-formed page with every section and inlined PNG images."""

from __future__ import annotations

import base64
import re
from html.parser import HTMLParser

import polars as pl
from test_plots import EXPECTED_PIXELS, handmade_design, handmade_points
from wakerank.report import PAGE_SECTIONS, build_report

VOID = {"meta", "img", "br", "hr", "link", "input"}


class TagBalance(HTMLParser):
    """Checks that every opened element is closed in order (void elements excepted)."""

    def __init__(self):
        super().__init__()
        self.stack: list[str] = []
        self.ids: set[str] = set()
        self.images: list[str] = []

    def handle_starttag(self, tag, attrs):
        attributes = dict(attrs)
        if "id" in attributes:
            self.ids.add(attributes["id"])
        if tag == "img":
            self.images.append(attributes["src"])
        if tag not in VOID:
            self.stack.append(tag)

    def handle_endtag(self, tag):
        assert self.stack and self.stack[-1] == tag, f"</{tag}> closes {self.stack[-1:]}"
        self.stack.pop()


def test_report_is_valid_html_with_every_section():
    points = handmade_points()
    design, sections = handmade_design()
    sections = sections.with_columns(label=pl.col("section_id").str.to_uppercase())
    shortlist = design.sort("cd").head(3).with_columns(rank=pl.int_range(1, 4))
    manifest = {"name": "survey <test>", "wakerank_version": "0", "failed_chunks": []}
    one = points.filter(pl.col("section_id") == "s-a")
    points = pl.concat([one.with_columns(section_id=pl.lit(i)) for i in shortlist["section_id"]])
    page = build_report(manifest=manifest, points=points, sections=sections, design=design,
                        shortlist=shortlist, design_cl=0.55)
    assert page.startswith("<!DOCTYPE html>")
    parser = TagBalance()
    parser.feed(page)
    parser.close()
    assert parser.stack == []
    assert {key for key, _ in PAGE_SECTIONS} <= parser.ids
    assert "survey &lt;test&gt;" in page
    assert "airworthiness" in page and "CFD" in page
    assert len(parser.images) == 2  # one polar figure and one map at Re 8e5
    for uri in parser.images:
        data = base64.b64decode(re.sub("^data:image/png;base64,", "", uri))
        assert data[:8] == b"\x89PNG\r\n\x1a\n"
        assert (int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")) == EXPECTED_PIXELS


def test_convergence_table_counts_first_order_wake_rows():
    from wakerank.report import convergence_table

    points = pl.DataFrame({
        "reynolds": [1e5, 1e5, 1e5, 2e5], "transition": ["free"] * 4,
        "converged": [True, True, False, True], "wake_curvature": [True, False, False, True],
        "error": [None] * 4,
    })
    table = convergence_table(points)
    assert table["converged"].to_list() == [2, 1]
    assert table["converged_first_order_wake"].to_list() == [1, 0]
