"""The package imports, exposes its version and its exception hierarchy."""

import wakerank as wr


def test_version_matches_core() -> None:
    assert wr.__version__.count(".") == 2


def test_errors_are_value_errors() -> None:
    assert issubclass(wr.GeometryError, ValueError)
    assert issubclass(wr.InputError, ValueError)
