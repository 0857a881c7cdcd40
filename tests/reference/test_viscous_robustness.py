"""Robustness of the viscous analysis over a family sweep, and a laminar separation bubble.

Acceptance figures set by the project: at least 95 % of the NACA 0012/2412/4415/23012 points
at Re 2e5, 1e6, 6e6 and α −6°..12° converge; a converged row never holds NaN. The E387
(McGhee, Walker & Millard, NASA TM-4062, 1988) has a laminar separation bubble on its upper
surface at Re 1e5–5e5 (measured in that report); the solution must show reversed flow
(cf < 0) between laminar separation and turbulent reattachment.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import polars as pl
import pytest

import wakerank as wr
from wakerank.viscous import POLAR_COLUMNS, analyze_batch

DATA = Path(__file__).resolve().parents[1] / "data"
FLOAT_COLUMNS = [c for c in POLAR_COLUMNS if c not in ("converged", "iterations")]


def _assert_converged_rows_finite(frame: pl.DataFrame) -> None:
    ok = frame.filter(pl.col("converged"))
    for column in FLOAT_COLUMNS:
        values = ok[column]
        if column.startswith("separation"):
            values = values.drop_nulls()
        assert np.all(np.isfinite(values.to_numpy())), column


def test_family_sweep_converges():
    # Common practice for an unattended screening tool (the project's robustness requirement):
    # at least 95 % of a broad family sweep converge, and no converged row holds NaN.
    sections = [wr.Section.naca(code) for code in ("0012", "2412", "4415", "23012")]
    conditions = [{"reynolds": re} for re in (2e5, 1e6, 6e6)]
    alphas = [float(a) for a in range(-6, 13)]
    frame = analyze_batch(sections, conditions, alphas, threads=2)
    assert frame.height == 4 * 3 * 19
    rate = frame["converged"].mean()
    assert rate >= 0.95, frame.filter(~pl.col("converged")).select("section", "reynolds", "alpha_deg")
    _assert_converged_rows_finite(frame)


@pytest.fixture(scope="module")
def e387():
    return wr.Section.from_file(DATA / "e387.txt")


def test_family_sweep_converged_rows_are_finite():
    sections = [wr.Section.naca(code) for code in ("0012", "2412")]
    frame = analyze_batch(sections, [{"reynolds": 1e6}], [-2.0, 0.0, 2.0, 4.0])
    assert frame["converged"].sum() > 0
    _assert_converged_rows_finite(frame)


@pytest.mark.parametrize("reynolds", [1e5, 2e5, 3e5, 5e5])
def test_e387_converges_at_low_reynolds(e387, reynolds):
    polar = wr.analyze(e387, alpha_deg=[float(a) for a in range(0, 11)], reynolds=reynolds)
    assert polar["converged"].all(), polar.filter(~pl.col("converged"))
    _assert_converged_rows_finite(polar)
    # The full model (wake-curvature term included) holds at least up to 7 degrees; beyond,
    # a few rows may fall back to the first-order wake, and say so (docs/validation.md).
    assert polar.filter(pl.col("alpha_deg") <= 7.0)["wake_curvature"].all()


@pytest.mark.parametrize(("reynolds", "alpha"), [(1e5, 2.0), (2e5, 4.0), (3e5, 2.0)])
def test_e387_laminar_separation_bubble_is_resolved(e387, reynolds, alpha):
    stations = wr.boundary_layer(e387, alpha_deg=alpha, reynolds=reynolds)
    upper = stations.filter(pl.col("side") == "upper").sort("s")
    cf = upper["cf"].to_numpy()
    regime = upper["regime"].to_list()
    reversed_flow = np.flatnonzero(cf < 0)
    assert reversed_flow.size > 0, "no reversed flow on the upper surface"
    first = reversed_flow[0]
    # The first contiguous reversed-flow region is the bubble.
    last = first
    while last + 1 < len(cf) and cf[last + 1] < 0:
        last += 1
    # Separation happens in the laminar layer, and the layer reattaches turbulent.
    assert regime[first] == "laminar"
    assert last + 1 < len(cf), "the layer never reattaches"
    assert cf[last + 1] >= 0 and regime[last + 1] == "turbulent"


def test_e387_solve_for_cl_reaches_the_lift_a_sweep_reaches(e387):
    # A sweep at Re 2e5 converges beyond cl 1.2 (first-order wake from about 9 degrees); the
    # target-cl search has the same attempts, continuation and fall-back, so it gets there too
    # (it stopped at cl 0.995 before; docs/method.md, "Sweeps and warm starts").
    row = wr.solve_for_cl(e387, cl=1.2, reynolds=2e5)
    assert row["converged"][0]
    assert abs(row["cl"][0] - 1.2) < 1e-3
    assert not row["wake_curvature"][0]


@pytest.mark.parametrize("alpha", [1.0, 7.0])
def test_reversed_flow_at_transition_is_not_reported_as_turbulent_separation(alpha):
    # NACA 4415, Re 1e6: transition happens where the laminar layer is at the point of
    # separating, and the first turbulent station lies in reversed flow before the layer
    # reattaches — a transitional bubble (common practice), not the turbulent separation that
    # `separation_upper` reports. Until version 0.4 such rows said 0.51 and 0.26, and the
    # ranking, which leaves separated points out, lost them (docs/method.md).
    section = wr.Section.naca("4415")
    polar = wr.analyze(section, alpha_deg=[alpha], reynolds=1e6)
    assert polar["converged"][0]
    assert polar["separation_upper"][0] is None
    stations = wr.boundary_layer(section, alpha_deg=alpha, reynolds=1e6)
    upper = stations.filter(pl.col("side") == "upper").sort("s")
    turbulent = upper.filter(pl.col("regime") == "turbulent")
    # The turbulent layer starts reversed or attached and stays attached to the trailing edge
    # once it has reattached.
    cf = turbulent["cf"].to_numpy()
    attached_from = int(np.argmax(cf > 0))
    assert (cf[attached_from:] > 0).all()


def test_finer_panelling_gives_the_same_polar():
    # Common practice for a discretisation check: refining the panels by half again changes
    # the drag by less than 2 % and the lift by less than 1.5 % in attached flow. NACA 2412,
    # Re 1e6, free transition, 4°–7° at 160 and 240 panels (version 0.4.1 gave cd 3 % and cl
    # 6.6 % apart at 5°, the 240-panel solution on another transition branch; since 0.4.2 a
    # case above 200 panels starts from the 160-panel solution: docs/validation.md).
    section = wr.Section.naca("2412")
    alphas = [4.0, 5.0, 6.0, 7.0]
    coarse = wr.analyze(section, alpha_deg=alphas, reynolds=1e6, panels=160)
    fine = wr.analyze(section, alpha_deg=alphas, reynolds=1e6, panels=240)
    assert coarse["converged"].all() and fine["converged"].all()
    cd_change = fine["cd"].to_numpy() / coarse["cd"].to_numpy() - 1.0
    cl_change = fine["cl"].to_numpy() / coarse["cl"].to_numpy() - 1.0
    assert np.all(np.abs(cd_change) < 0.02), cd_change
    assert np.all(np.abs(cl_change) < 0.015), cl_change


@pytest.mark.parametrize("reynolds", [7e4, 1e5])
def test_symmetric_section_converges_at_low_reynolds_numbers(reynolds):
    # Our measurement (docs/validation.md, "Low Reynolds numbers"): NACA 0012 at Re 7e4 and
    # 1e5, α −2°..8°, all six points converge since version 0.4.3 (none before: the laminar
    # layer reaches the trailing edge with N near the critical value). Common practice for the
    # checks: no NaN in a converged row, cl = 0 at 0° for a symmetric section, and a drag
    # above the laminar flat plate's (Blasius, both sides: 2 × 1.328/√Re).
    polar = wr.analyze(wr.Section.naca("0012"), alpha_deg=[-2.0, 0.0, 2.0, 4.0, 6.0, 8.0],
                       reynolds=reynolds)
    assert polar["converged"].all(), polar
    _assert_converged_rows_finite(polar)
    zero = polar.filter(pl.col("alpha_deg") == 0.0)
    assert abs(zero["cl"][0]) < 1e-6
    assert zero["cd"][0] > 2 * 1.328 / np.sqrt(reynolds)


@pytest.mark.parametrize("code", ["4412", "4415"])
def test_cambered_sections_converge_at_re_7e4(code):
    # Our measurement (docs/validation.md, "Low Reynolds numbers"): NACA 4412 and 4415 at
    # Re 7e4, α −2°..8°: 2 and 0 of six points converged until version 0.4.3, all six with
    # the continuation in the Reynolds number (docs/method.md). Common practice for the checks:
    # no NaN in a converged row, the lift rising with the angle below stall, and a drag above
    # the laminar flat plate's (Blasius, both sides: 2 × 1.328/√Re).
    reynolds = 7e4
    polar = wr.analyze(wr.Section.naca(code), alpha_deg=[-2.0, 0.0, 2.0, 4.0, 6.0, 8.0],
                       reynolds=reynolds)
    assert polar["converged"].all(), polar
    _assert_converged_rows_finite(polar)
    assert np.all(np.diff(polar["cl"].to_numpy()) > 0.0), polar
    assert polar["cd"].min() > 2 * 1.328 / np.sqrt(reynolds)


def test_fine_panelling_converges_at_high_angles_of_attack():
    # Our measurement (docs/method.md, "Sweeps and warm starts", nested iteration): NACA 0012
    # at Re 5.97e6, M 0.15, 12° and 14° asked for alone at 320 panels did not converge until
    # version 0.4.3 (the coarse solution at 160 panels did not converge from the inviscid flow,
    # so the nested start was missing). Check (common practice, panel convergence): both
    # converge and agree with the 160-panel rows within 1 % in cl and cd.
    section = wr.Section.naca("0012")
    rows = {
        panels: wr.analyze(section, alpha_deg=[12.0, 14.0], reynolds=5.97e6, mach=0.15,
                           panels=panels)
        for panels in (160, 320)
    }
    assert rows[160]["converged"].all() and rows[320]["converged"].all(), rows
    for column in ("cl", "cd"):
        change = rows[320][column].to_numpy() / rows[160][column].to_numpy() - 1.0
        assert np.all(np.abs(change) < 0.01), (column, change)


def test_very_high_reynolds_number_rows_carry_the_full_wake_model():
    # Our measurement (docs/validation.md, "Robustness"): NACA 0012 at Re 1e8 fell back to the
    # first-order wake at 5 of 7 angles (−4°…8°, 2° steps, among them ±2° and 4°) until
    # version 0.4.3; the continuation in the Reynolds number from 1e7 reaches the full
    # model's solution. Checks (common practice): converged
    # with the wake-curvature term, mirror-image rows at ±2° for a symmetric section, and a
    # drag above the fully turbulent flat plate's at that Reynolds number (Prandtl–Schlichting,
    # both sides: 2 × 0.455/(log10 Re)^2.58, reference-data.md).
    polar = wr.analyze(wr.Section.naca("0012"), alpha_deg=[-2.0, 2.0, 4.0], reynolds=1e8)
    assert polar["converged"].all() and polar["wake_curvature"].all(), polar
    cl, cd = polar["cl"].to_numpy(), polar["cd"].to_numpy()
    assert abs(cl[0] + cl[1]) < 1e-6 and abs(cd[0] - cd[1]) < 1e-9
    assert cd.min() > 2 * 0.455 / np.log10(1e8) ** 2.58
