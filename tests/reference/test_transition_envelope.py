"""Orr–Sommerfeld solver of scripts/orr_sommerfeld_envelope.py and the shipped envelope table."""

from __future__ import annotations

import csv
import sys
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "scripts"))

import falkner_skan_closures as fs
import orr_sommerfeld_envelope as ose

TABLE = ROOT / "rust/solver/src/boundary_layer/data/amplification_envelope.csv"
BLASIUS_H = 2.5911


@pytest.fixture(scope="module")
def blasius_stability() -> ose.OrrSommerfeld:
    return ose.OrrSommerfeld(fs.solve_at_beta(0.0))


def _rows() -> list[dict[str, float]]:
    lines = [ln for ln in TABLE.read_text().splitlines() if ln and not ln.startswith("#")]
    return [{k: float(v) for k, v in r.items()} for r in csv.DictReader(lines)]


def test_blasius_neutral_point(blasius_stability):
    # Parallel-flow critical point of the Blasius layer (Jordinson 1970; Schlichting & Gersten,
    # ch. 15; from memory): Reδ* = 519.4, αδ* = 0.3034, c_r = 0.3965 with c_i = 0.
    wave = blasius_stability.least_stable(0.3034 / BLASIUS_H, 519.4 / BLASIUS_H)
    c = wave / (0.3034 / BLASIUS_H)
    assert c.real == pytest.approx(0.3965, abs=0.002)
    assert abs(c.imag) < 2e-4


def test_blasius_critical_reynolds_number(blasius_stability):
    # Same source: the lowest Reδ* with a growing wave is 519.4 (Reθ = 200.5), from memory.
    re_theta, _alpha = ose.critical_re_theta(blasius_stability)
    assert re_theta * BLASIUS_H == pytest.approx(519.4, rel=0.02)
    shipped = [r for r in _rows() if abs(r["shape_factor"] - BLASIUS_H) < 1e-3]
    assert shipped and shipped[0]["critical_re_theta"] == pytest.approx(re_theta, rel=1e-6)


def test_blasius_envelope_reaches_n9_near_three_million():
    # e^9 on a flat plate is commonly placed near Re_x ≈ 3e6 (common practice, from memory);
    # Reθ = 0.664 √Re_x (Blasius).
    rows = [r for r in _rows() if abs(r["shape_factor"] - BLASIUS_H) < 1e-3]
    ratios = [r["re_theta_ratio"] for r in rows]
    n = [r["envelope_n"] for r in rows]
    ratio_at_9 = float(np.interp(9.0, n, ratios))
    re_x = (ratio_at_9 * rows[0]["critical_re_theta"] / 0.6641) ** 2
    assert 2.5e6 < re_x < 4.0e6


def test_separation_profile_is_far_less_stable():
    # Inflectional profiles: the critical Reynolds number of the Falkner–Skan separation profile
    # is an order of magnitude below Blasius (Schlichting & Gersten, ch. 15; from memory).
    rows = _rows()
    crit = {round(r["shape_factor"], 3): r["critical_re_theta"] for r in rows}
    assert crit[4.029] < 0.2 * crit[2.591]
