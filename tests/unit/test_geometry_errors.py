"""Every kind of bad geometry: a GeometryError naming the file and line, from Python and
through the CLI (exit code 2, one line on stderr, no traceback)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
import wakerank as wr


def _loop(points: int = 30) -> tuple[np.ndarray, np.ndarray]:
    s = wr.Section.naca("2412", points=points)
    return s.x.copy(), s.y.copy()


def _lines(x, y) -> list[str]:  # type: ignore[no-untyped-def]
    return [f"{a:.6f} {b:.6f}" for a, b in zip(x, y)]


def _too_few() -> tuple[list[str], str]:
    x, y = _loop()
    return _lines(x[::9], y[::9]), "only 7 points"


def _nan() -> tuple[list[str], str]:
    lines = _lines(*_loop())
    lines[11] = "0.5 nan"
    return lines, "line 13: y is not a finite number"


def _text() -> tuple[list[str], str]:
    lines = _lines(*_loop())
    lines[7] = "0.61 abc"
    return lines, "line 9: expected two numbers, found 'abc'"


def _duplicate() -> tuple[list[str], str]:
    lines = _lines(*_loop())
    lines.insert(15, lines[14])
    return lines, "line 17: repeats the point at line 16"


def _self_intersection() -> tuple[list[str], str]:
    x, y = _loop()
    y[8:13] = -y[8:13]
    return _lines(x, y), "crosses itself"


def _two_loops() -> tuple[list[str], str]:
    x, y = _loop()
    return _lines(x, y) + _lines(x, y + 0.5), "more than one loop"


def _big_gap() -> tuple[list[str], str]:
    x, y = _loop()
    y[0] += 0.08
    return _lines(x, y), "trailing-edge gap"


def _unrecognised() -> tuple[list[str], str]:
    x, y = _loop()
    order = (np.arange(x.size) * 37) % x.size
    return _lines(x[order], y[order]), "point order is not recognised"


CASES = {
    "too_few_points": _too_few,
    "nan": _nan,
    "text_in_number_column": _text,
    "duplicate_point": _duplicate,
    "self_intersection": _self_intersection,
    "two_loops": _two_loops,
    "big_trailing_edge_gap": _big_gap,
    "unrecognised_ordering": _unrecognised,
}


def _write(tmp_path: Path, case: str) -> tuple[Path, str]:
    lines, expected = CASES[case]()
    path = tmp_path / f"{case}.txt"
    path.write_text("bad section\n" + "\n".join(lines) + "\n")
    return path, expected


@pytest.mark.parametrize("case", sorted(CASES))
def test_file_errors_name_the_file_and_the_problem(tmp_path: Path, case: str) -> None:
    path, expected = _write(tmp_path, case)
    with pytest.raises(wr.GeometryError) as info:
        wr.Section.from_file(path)
    message = str(info.value)
    assert str(path) in message
    assert expected in message
    assert "\n" not in message


@pytest.mark.parametrize("case", sorted(CASES))
def test_cli_prints_one_line_and_exits_2(tmp_path: Path, case: str) -> None:
    path, expected = _write(tmp_path, case)
    result = subprocess.run(
        [sys.executable, "-c", "from wakerank.cli import main; main()", "section", str(path)],
        capture_output=True,
        check=False,
        text=True,
        timeout=120,
    )
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    assert lines[0].startswith("error: ") and str(path) in lines[0] and expected in lines[0]


def test_point_arrays_name_the_index() -> None:
    x, y = _loop()
    y[5] = np.inf
    with pytest.raises(wr.GeometryError, match=r"section 'mine' point 5: y is not a finite number"):
        wr.Section.from_coordinates(x, y, name="mine")


def test_mismatched_arrays_are_input_errors() -> None:
    with pytest.raises(wr.InputError, match="x has 3 values but y has 2"):
        wr.Section.from_coordinates([0.0, 1.0, 2.0], [0.0, 1.0])


def test_cli_unknown_spec() -> None:
    result = subprocess.run(
        [sys.executable, "-c", "from wakerank.cli import main; main()", "section", "24x2"],
        capture_output=True,
        check=False,
        text=True,
        timeout=120,
    )
    assert result.returncode == 2
    assert result.stderr.strip() == (
        "error: '24x2' is neither a NACA designation (e.g. 2412, 23012, 0012-34) nor an existing file"
    )
