"""Campaign files: valid files expand as written; malformed ones get one clear error."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
from campaign_fakes import TINY_CAMPAIGN, install
from wakerank import CampaignError
from wakerank.campaign import load_campaign, parse_campaign
from wakerank.cases import expand, latin_hypercube

ROOT = Path(__file__).resolve().parents[2]

ISSUE_EXAMPLE = """\
name = "survey-wing-root"
panels = 160

[[sections]]
family = "naca4"
camber = {from = 0.0, to = 0.06, count = 4}
camber_position = [0.3, 0.4, 0.5]
thickness = {from = 0.10, to = 0.16, count = 4}

[[sections]]
family = "naca5"
codes = ["23012", "23015"]

[[sections]]
family = "cst"
sample = {count = 64, seed = 7}
upper = {low = [0.15, 0.15, 0.15, 0.15], high = [0.25, 0.30, 0.30, 0.25]}
lower = {low = [-0.20, -0.15, -0.10, -0.05], high = [-0.10, -0.05, 0.00, 0.05]}

[conditions]
reynolds = [4e5, 8e5, 1.6e6]
mach = 0.08
n_factor = 9.0
alpha_deg = {from = -4, to = 14, step = 0.5}
transition = ["free", {upper = 0.05, lower = 0.05}]

[design]
cl = [0.4, 0.55]
min_thickness = 0.11
max_abs_cm = 0.10
min_stall_margin = 0.3
"""


def test_issue_example_expands_to_the_expected_counts(tmp_path, monkeypatch):
    install(monkeypatch)
    path = tmp_path / "c.toml"
    path.write_text(ISSUE_EXAMPLE)
    plan = expand(load_campaign(path), chunk_size=10)
    # naca4: 4 thicknesses symmetric + 3 cambers x 3 positions x 4 thicknesses; 2 + 64 more
    assert len(plan.sections) == 4 + 36 + 2 + 64
    assert len(plan.conditions) == 3 * 2
    assert all(len(c.alpha_deg) == 37 for c in plan.conditions)
    assert plan.case_count == 106 * 6 and len(plan.chunks) == -(-636 // 10)
    again = expand(load_campaign(path), chunk_size=10)
    assert [c.chunk_id for c in plan.chunks] == [c.chunk_id for c in again.chunks]


def test_latin_hypercube_has_one_point_per_stratum_and_repeats_with_its_seed():
    import numpy as np

    low, high = np.array([0.0, -1.0]), np.array([1.0, 1.0])
    sample = latin_hypercube(16, low, high, seed=7)
    for j in range(2):
        strata = np.floor((sample[:, j] - low[j]) / (high[j] - low[j]) * 16)
        assert sorted(strata) == list(range(16))  # McKay, Beckman & Conover (1979)
    assert np.array_equal(sample, latin_hypercube(16, low, high, seed=7))
    assert not np.array_equal(sample, latin_hypercube(16, low, high, seed=8))


MALFORMED = [
    (
        "count = 4}",
        'count = "four"}',
        "sections[0].camber.count: expected an integer >= 1, got 'four'",
    ),
    ("mach = 0.08", "mach = 0.08\nspeed = 3", "conditions: unknown key 'speed'"),
    (
        "thickness = {",
        "thicknes = {",
        "sections[0]: unknown key 'thicknes' (did you mean 'thickness'?)",
    ),
    ('family = "naca5"', 'family = "naca7"', "sections[1].family: unknown family 'naca7'"),
    ("step = 0.5", "step = 0", "conditions.alpha_deg.step: expected a number > 0"),
    ("to = 14", "to = -10", "conditions.alpha_deg: empty range"),
    ("reynolds = [4e5, 8e5, 1.6e6]", "reynolds = []", "conditions.reynolds: expected at least 1"),
    ("reynolds = [4e5, 8e5, 1.6e6]", 'reynolds = "high"', "conditions.reynolds: expected a number"),
    ('"23015"', '"2301x"', "sections[1].codes[1]: expected a NACA code"),
    ("{upper = 0.05, lower = 0.05}", "{upper = 2.0}", "conditions.transition[1].upper"),
    ("panels = 160", "panels = 16.5", "panels: expected an integer"),
    ("seed = 7}", "seed = -1}", "sections[2].sample.seed: expected an integer >= 0"),
    ("cl = [0.4, 0.55]", "cl = [0.4, 0.55]\nweights = [1.0]", "design: weights has 1 entries"),
    ("panels = 160", "panels = = 160", "not valid TOML"),
]


@pytest.mark.parametrize(("old", "new", "message"), MALFORMED)
def test_malformed_file_gets_one_error_naming_the_key(old, new, message):
    assert old in ISSUE_EXAMPLE
    with pytest.raises(CampaignError) as caught:
        parse_campaign(ISSUE_EXAMPLE.replace(old, new, 1), source="c.toml")
    assert str(caught.value).startswith("c.toml: ")
    assert message in str(caught.value)
    assert "\n" not in str(caught.value)


def test_glob_matching_no_file_is_an_error(tmp_path, monkeypatch):
    install(monkeypatch)
    path = tmp_path / "c.toml"
    path.write_text(
        TINY_CAMPAIGN.replace(
            "[conditions]",
            '[[sections]]\nfamily = "file"\npaths = ["candidates/*.dat"]\n\n[conditions]',
        )
    )
    with pytest.raises(
        CampaignError, match=r"sections\[2\]\.paths\[0\]: 'candidates/\*\.dat' matches no file"
    ):
        expand(load_campaign(path))


def _cli(args, cwd):
    return subprocess.run(
        [sys.executable, "-c", "from wakerank.cli import main; main()", *args],
        cwd=cwd,
        capture_output=True,
        text=True,
        timeout=120,
    )


@pytest.mark.parametrize(("old", "new", "message"), [MALFORMED[0], MALFORMED[1], MALFORMED[5]])
def test_cli_prints_one_line_exits_nonzero_and_writes_nothing(tmp_path, old, new, message):
    path = tmp_path / "bad.toml"
    path.write_text(ISSUE_EXAMPLE.replace(old, new, 1))
    result = _cli(["run", str(path), "--out", str(tmp_path / "out")], tmp_path)
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    assert result.stderr.strip().count("\n") == 0 and message in result.stderr
    assert not (tmp_path / "out").exists() and not (tmp_path / "catalogs").exists()


def test_cli_missing_campaign_file(tmp_path):
    result = _cli(["run", str(tmp_path / "nope.toml")], tmp_path)
    assert result.returncode == 2 and "no such campaign file" in result.stderr
    assert "Traceback" not in result.stderr


def test_unreadable_section_file_names_the_file(tmp_path):
    wr = pytest.importorskip("wakerank")
    if not hasattr(wr, "Section"):
        pytest.skip("the geometry module has not landed")
    (tmp_path / "candidates").mkdir()
    (tmp_path / "candidates" / "broken.txt").write_text("broken section\n1.0 0.0\nnot numbers\n")
    path = tmp_path / "c.toml"
    path.write_text(
        TINY_CAMPAIGN.replace(
            "[conditions]",
            '[[sections]]\nfamily = "file"\npaths = ["candidates/*.txt"]\n\n[conditions]',
        )
    )
    result = _cli(["run", str(path), "--out", str(tmp_path / "out")], tmp_path)
    assert result.returncode == 2 and "Traceback" not in result.stderr
    assert "sections[2].paths[0]" in result.stderr and "broken.txt" in result.stderr
    assert not (tmp_path / "out").exists()


def test_demo_campaign_copies_are_identical_and_valid():
    packaged = ROOT / "python" / "wakerank" / "data" / "demo.toml"
    assert packaged.read_text() == (ROOT / "catalogs" / "demo.toml").read_text()
    campaign = parse_campaign(packaged.read_text())
    assert campaign.design is not None and campaign.design.min_thickness == 0.12


def test_real_sections_rebuild_to_the_same_geometry(tmp_path):
    wr = pytest.importorskip("wakerank")
    if not hasattr(wr, "Section"):
        pytest.skip("the geometry module has not landed")
    from handmade_sections import naca_symmetric

    x, y = naca_symmetric(0.11)
    (tmp_path / "candidates").mkdir()
    (tmp_path / "candidates" / "mine.txt").write_text(
        "my section\n" + "\n".join(f"{a:.8f} {b:.8f}" for a, b in zip(x, y)) + "\n"
    )
    path = tmp_path / "c.toml"
    path.write_text(
        TINY_CAMPAIGN.replace(
            "[conditions]",
            '[[sections]]\nfamily = "file"\npaths = ["candidates/*.txt"]\n\n[conditions]',
        )
    )
    plan = expand(load_campaign(path))
    assert [s.family for s in plan.sections] == ["naca4"] * 4 + ["naca", "file"]
    for spec in plan.sections:
        assert spec.build().geometry_id == spec.section_id  # workers rebuild the same outline
    assert plan.sections[-1].label == "my section"
