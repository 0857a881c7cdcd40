"""Viscous analysis: argument checking, the fixed column interface, and the CLI options."""

from __future__ import annotations

import math

import polars as pl
import pytest

import wakerank as wr
from wakerank.viscous import POLAR_COLUMNS, STATION_COLUMNS


@pytest.fixture(scope="module")
def naca0012():
    return wr.Section.naca("0012")


@pytest.mark.parametrize(
    ("kwargs", "name", "allowed"),
    [
        ({"reynolds": 5e3}, "reynolds", "1e4 to 1e8"),
        ({"reynolds": 2e8}, "reynolds", "1e4 to 1e8"),
        ({"reynolds": 1e6, "mach": 0.75}, "mach", "0 to 0.7"),
        ({"reynolds": 1e6, "mach": -0.1}, "mach", "[0"),
        ({"reynolds": 1e6, "n_factor": 0.5}, "n_factor", "1 to 20"),
        ({"reynolds": 1e6, "n_factor": 25.0}, "n_factor", "1 to 20"),
        ({"reynolds": 1e6, "turbulence_intensity": 0.2}, "turbulence_intensity", "1e-4 to 0.05"),
        ({"reynolds": 1e6, "turbulence_intensity": 1e-5}, "turbulence_intensity", "1e-4 to 0.05"),
        ({"reynolds": 1e6, "trip_upper": 1.5}, "trip_upper", "0 to 1"),
        ({"reynolds": 1e6, "trip_lower": -0.2}, "trip_lower", "0 to 1"),
    ],
)
@pytest.mark.filterwarnings("ignore:mach")
def test_bad_range_is_an_input_error_naming_argument_and_range(naca0012, kwargs, name, allowed):
    with pytest.raises(wr.InputError) as info:
        wr.analyze(naca0012, alpha_deg=0.0, **kwargs)
    message = str(info.value)
    assert name in message and allowed in message, message
    assert isinstance(info.value, ValueError)


def test_bad_range_in_solve_for_cl_and_boundary_layer(naca0012):
    with pytest.raises(wr.InputError, match="mach"):
        wr.solve_for_cl(naca0012, cl=0.3, reynolds=1e6, mach=0.9)
    with pytest.raises(wr.InputError, match="reynolds"):
        wr.boundary_layer(naca0012, alpha_deg=0.0, reynolds=1.0)


def test_polar_has_the_fixed_columns(naca0012):
    polar = wr.analyze(naca0012, alpha_deg=[0.0, 2.0], reynolds=1e6)
    assert list(polar.columns[: len(POLAR_COLUMNS)]) == list(POLAR_COLUMNS)
    assert polar.height == 2
    assert polar["converged"].dtype == pl.Boolean
    assert polar["iterations"].dtype == pl.Int64
    assert polar["alpha_deg"].to_list() == [0.0, 2.0]
    # Attached points of a NACA 0012 are solved with the full model (wake-curvature term).
    assert polar["wake_curvature"].dtype == pl.Boolean
    assert polar["wake_curvature"].all()


def test_station_table_has_the_fixed_columns(naca0012):
    stations = wr.boundary_layer(naca0012, alpha_deg=2.0, reynolds=1e6)
    assert list(stations.columns) == list(STATION_COLUMNS)
    assert set(stations["side"].unique().to_list()) == {"upper", "lower", "wake"}
    assert set(stations["regime"].unique().to_list()) <= {"laminar", "turbulent", "wake"}
    wake = stations.filter(pl.col("side") == "wake")
    assert (wake["regime"] == "wake").all()


def test_without_reynolds_analyze_stays_inviscid(naca0012):
    polar = wr.analyze(naca0012, alpha_deg=[0.0, 4.0])
    assert "cd_squire_young" not in polar.columns


def test_solve_for_cl_hits_the_target(naca0012):
    row = wr.solve_for_cl(naca0012, cl=0.5, reynolds=3e6)
    assert row.height == 1
    assert row["converged"][0]
    assert math.isclose(row["cl"][0], 0.5, abs_tol=1e-3)


def test_solve_for_cl_beyond_maximum_lift_is_an_error(naca0012):
    with pytest.raises(wr.ConvergenceError, match="maximum lift"):
        wr.solve_for_cl(naca0012, cl=2.8, reynolds=1e6)


def test_solve_for_cl_is_not_stopped_by_a_change_of_solution_branch():
    # Our design (target_cl.rs): a lift that falls over a short step of α is free transition
    # changing place, not maximum lift. NACA 2412, Re 1e6, 240 panels: cl 0.6992 at 4.144° and
    # 0.6873 at 4.150° in version 0.4.1, which stopped there ("maximum lift"); both targets are
    # reached (cl 0.7 since version 0.4.4, whose nested start from 160 panels removed that
    # jump at 240 panels).
    section = wr.Section.naca("2412")
    for target in (0.9, 0.7):
        row = wr.solve_for_cl(section, cl=target, reynolds=1e6, panels=240)
        assert row["converged"][0] and math.isclose(row["cl"][0], target, abs_tol=1e-3)


def test_solve_for_cl_reports_a_jump_of_the_lift_across_the_target():
    # Our design (target_cl.rs): NACA 0012, Re 5.97e6, M 0.15, free transition: the lift
    # jumps from 1.388 to 1.413 within 0.001° near 12.8° (two branches of the discrete
    # solution, docs/validation.md), so cl 1.39 is an error that says so and names both sides;
    # a jump of at most 0.002 across the target (1.3849 to 1.3852 for cl 1.385: transition
    # moving one station) gives the row on its nearer side.
    section = wr.Section.naca("0012")
    with pytest.raises(wr.ConvergenceError, match="jumps across") as failure:
        wr.solve_for_cl(section, cl=1.39, reynolds=5.97e6, mach=0.15)
    assert "maximum lift" not in str(failure.value)
    row = wr.solve_for_cl(section, cl=1.385, reynolds=5.97e6, mach=0.15)
    assert row["converged"][0] and math.isclose(row["cl"][0], 1.385, abs_tol=1e-3)


def test_cli_analyze_with_reynolds():
    from typer.testing import CliRunner

    from wakerank.cli import app

    result = CliRunner().invoke(
        app, ["analyze", "0012", "--alpha", "0,4", "--re", "1e6", "--n-factor", "9"],
        env={"COLUMNS": "200"},
    )
    assert result.exit_code == 0, result.output
    assert "cd_squire_young" in result.output and "viscous" in result.output


def test_cli_analyze_bad_reynolds_is_one_line_error():
    from typer.testing import CliRunner

    from wakerank.cli import app

    result = CliRunner().invoke(app, ["analyze", "0012", "--alpha", "0", "--re", "10"])
    assert result.exit_code == 2
    assert "reynolds" in result.output
    assert "Traceback" not in result.output


def test_viscous_rows_say_where_the_flow_turns_locally_supersonic():
    # critical_mach_reached is cp_min < Cp*(M); at M 0.7 Cp* = -0.779 (isentropic relations,
    # Anderson, Modern Compressible Flow): the NACA 0012 passes it by 2°, not at 0°; at M 0 it
    # never does.
    section = wr.Section.naca("0012")
    polar = wr.analyze(section, alpha_deg=[0.0, 2.0], reynolds=6e6, mach=0.7)
    assert polar["critical_mach_reached"].to_list() == [False, True]
    assert polar["cp_min"][0] > -0.779 > polar["cp_min"][1]
    incompressible = wr.analyze(section, alpha_deg=[4.0], reynolds=6e6)
    assert not incompressible["critical_mach_reached"][0]
