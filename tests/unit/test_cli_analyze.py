"""`wakerank analyze`: tables, output files, and one-line errors with exit code 2."""

from __future__ import annotations

from pathlib import Path

import polars as pl
from typer.testing import CliRunner

from wakerank.cli import app

runner = CliRunner()


def test_analyze_prints_a_table() -> None:
    result = runner.invoke(app, ["analyze", "2412", "--alpha", "0:4:2"])
    assert result.exit_code == 0, result.output
    assert "NACA 2412" in result.output.upper() and "0.0000" in result.output


def test_analyze_writes_parquet_and_csv(tmp_path: Path) -> None:
    for name in ["polar.parquet", "polar.csv"]:
        out = tmp_path / name
        result = runner.invoke(app, ["analyze", "0012", "--alpha", "-2:2:2", "--panels", "120", "--out", str(out)])
        assert result.exit_code == 0, result.output
        table = pl.read_parquet(out) if out.suffix == ".parquet" else pl.read_csv(out)
        assert table.height == 3 and "cm_c4" in table.columns


def test_analyze_reads_a_coordinate_file(tmp_path: Path) -> None:
    import wakerank as wr

    section = wr.Section.naca("4412")
    path = tmp_path / "mine.dat"
    path.write_text("my section\n" + "\n".join(f"{a:.6f} {b:.6f}" for a, b in zip(section.x, section.y)))
    result = runner.invoke(app, ["analyze", str(path), "--alpha", "2"])
    assert result.exit_code == 0, result.output
    assert "my section" in result.output


def _one_line_error(args: list[str], needle: str) -> None:
    result = runner.invoke(app, args)
    assert result.exit_code == 2, result.output
    lines = [line for line in result.output.splitlines() if line.strip()]
    assert len(lines) == 1 and lines[0].startswith("error:") and needle in lines[0], result.output
    assert "Traceback" not in result.output


def test_bad_mach_is_one_line() -> None:
    _one_line_error(["analyze", "0012", "--mach", "0.95"], "mach")


def test_bad_alpha_is_one_line() -> None:
    _one_line_error(["analyze", "0012", "--alpha", "4:0:1"], "alpha_deg")


def test_bad_output_suffix_is_one_line(tmp_path: Path) -> None:
    _one_line_error(["analyze", "0012", "--alpha", "0", "--out", str(tmp_path / "x.txt")], "--out")


def test_unknown_section_is_one_line() -> None:
    result = runner.invoke(app, ["analyze", "not-a-section"])
    assert result.exit_code == 2 and "Traceback" not in result.output
    assert result.output.strip().startswith("error:")


def test_viscous_view_marks_first_order_wake_rows() -> None:
    from wakerank.cli.analyze import FIRST_ORDER_MARK, VISCOUS_SHOWN, viscous_view

    table = pl.DataFrame(
        {name: [0.0, 1.0, 2.0] for name in VISCOUS_SHOWN if name != "converged"}
        | {"converged": [True, True, False], "wake_curvature": [True, False, False]}
    )
    view = viscous_view(table)
    assert view.columns == VISCOUS_SHOWN
    assert view["converged"].to_list() == ["yes", FIRST_ORDER_MARK, "no"]


def test_viscous_view_blanks_the_values_of_rows_that_did_not_converge() -> None:
    # A failed solution's last iterate (cl -28 at NACA 0006, Re 1e6, 10°) is not printed beside
    # converged rows; the angle and the flag stay, --out keeps the full row.
    from wakerank.cli.analyze import VISCOUS_SHOWN, viscous_view

    table = pl.DataFrame(
        {name: [1.5, -28.0] for name in VISCOUS_SHOWN if name != "converged"}
        | {"converged": [True, False], "wake_curvature": [True, False]}
    )
    view = viscous_view(table)
    failed = view.row(1, named=True)
    assert failed["alpha_deg"] == -28.0 and failed["converged"] == "no"
    blanked = [name for name in VISCOUS_SHOWN if name not in ("alpha_deg", "converged")]
    assert all(failed[name] is None for name in blanked)
    assert view.row(0, named=True)["cl"] == 1.5


def test_analyze_warns_where_the_flow_turns_locally_supersonic() -> None:
    # At M 0.7 the critical Cp is -0.78 (isentropic relations; Anderson, Modern Compressible
    # Flow): the NACA 0012's cp_min passes it by 2° (-1.26), not at 0° (-0.63).
    result = runner.invoke(
        app, ["analyze", "0012", "--alpha", "0,2", "--re", "6e6", "--mach", "0.7"],
        env={"COLUMNS": "200"},
    )
    assert result.exit_code == 0, result.output
    assert "locally supersonic" in result.output and "alpha_deg = 2:" in result.output
    quiet = runner.invoke(app, ["analyze", "0012", "--alpha", "0", "--mach", "0.3"])
    assert quiet.exit_code == 0 and "supersonic" not in quiet.output
