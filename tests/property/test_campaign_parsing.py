"""Property tests of campaign parsing: valid ranges expand to the right counts, junk gives a
CampaignError (never another exception)."""

from __future__ import annotations

import string
import sys
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "unit"))

import wakerank.cases
from campaign_fakes import build_fake
from wakerank import CampaignError
from wakerank.campaign import LoadedCampaign, parse_campaign
from wakerank.cases import expand

count_range = st.builds(
    lambda lo, width, n: (f"{{from = {lo!r}, to = {lo + width!r}, count = {n}}}", n),
    st.floats(0.05, 0.15),
    st.floats(0.0, 0.05),
    st.integers(1, 4),
)
value_list = st.lists(st.floats(0.06, 0.2), min_size=1, max_size=4, unique=True).map(
    lambda v: (repr(v).replace("'", ""), len(v))
)
step_range = st.builds(
    lambda lo, n, step: (f"{{from = {lo}, to = {lo + (n - 1) * step}, step = {step}}}", n),
    st.integers(-5, 5),
    st.integers(1, 12),
    st.sampled_from([0.25, 0.5, 1.0, 2.0]),
)


@settings(max_examples=60, deadline=None)
@given(
    thickness=st.one_of(count_range, value_list),
    alphas=step_range,
    reynolds=st.lists(st.sampled_from([2e5, 5e5, 1e6, 3e6]), min_size=1, max_size=3, unique=True),
    trips=st.booleans(),
    chunk=st.integers(1, 9),
)
def test_valid_ranges_expand_to_the_right_counts(thickness, alphas, reynolds, trips, chunk):
    thickness_text, n_thickness = thickness
    alpha_text, n_alpha = alphas
    transition = '["free", {upper = 0.1}]' if trips else '["free"]'
    text = f"""
name = "p"
[[sections]]
family = "naca4"
camber = [0.02]
camber_position = [0.4]
thickness = {thickness_text}
[conditions]
reynolds = {reynolds!r}
alpha_deg = {alpha_text}
transition = {transition}
"""
    campaign = parse_campaign(text)
    loaded = LoadedCampaign(campaign=campaign, path=Path("/nowhere/p.toml"), text=text)
    original = wakerank.cases._build
    wakerank.cases._build = build_fake
    try:
        plan = expand(loaded, chunk_size=chunk)
    finally:
        wakerank.cases._build = original
    # Distinct parameter values are distinct requested sections (the fake hashes them exactly).
    n_sections = len(set(_thickness_values(campaign)))
    assert n_sections <= n_thickness
    assert len(plan.sections) == n_sections
    assert len(plan.conditions) == len(reynolds) * (2 if trips else 1)
    assert all(len(c.alpha_deg) == n_alpha for c in plan.conditions)
    assert sum(len(c.cases) for c in plan.chunks) == plan.case_count
    assert len(plan.chunks) == -(-plan.case_count // chunk)


def _thickness_values(campaign):
    from wakerank.campaign import values_of

    return values_of(campaign.sections[0].thickness)


toml_scalar = st.one_of(
    st.integers(-5, 5).map(str),
    st.floats(-2, 2, allow_nan=False).map(repr),
    st.text(string.ascii_letters, max_size=6).map(lambda s: f'"{s}"'),
    st.just("true"),
    st.just("[]"),
    st.just("{}"),
    st.just('[1, "a"]'),
)
keys = st.sampled_from(
    [
        "name",
        "panels",
        "chunk_size",
        "family",
        "camber",
        "thickness",
        "reynolds",
        "alpha_deg",
        "codes",
        "bogus",
        "transition",
        "cl",
    ]
)


@settings(max_examples=150, deadline=None)
@given(
    st.lists(
        st.tuples(
            st.sampled_from(["", "[conditions]\n", "[[sections]]\n", "[design]\n"]),
            keys,
            toml_scalar,
        ),
        max_size=8,
    )
)
def test_junk_gives_campaign_error_not_a_traceback(entries):
    text = "".join(f"{table}{key} = {value}\n" for table, key, value in entries)
    try:
        parse_campaign(text)
    except CampaignError as error:
        assert str(error).startswith("campaign.toml: ") and "\n" not in str(error)


@settings(max_examples=100, deadline=None)
@given(st.binary(max_size=200))
def test_random_bytes_give_campaign_error(blob):
    try:
        parse_campaign(blob.decode("utf-8", errors="replace"))
    except CampaignError:
        pass
