"""``check``'s balance findings on open real assays (NOAA ADIOS records, CC0; tests/open_assays.py)."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from assaycut.model.crude import build_model
from assaycut.studies.assay_checks import BALANCE_WARN, check_assay
from tests import open_assays as oa


def record(rid):
    return next(r for r in oa.records() if r["id"] == rid)


def balance(findings, what):
    return [f for f in findings if f.message.startswith(f"{what} balance")]


def test_a_crude_whose_cuts_close_gets_an_info_and_the_cuts_kept():
    # EX00008 (Bonga): its seven measured cuts, by volume, add up to its measured gravity (sum of vol % x
    # density over the record's cuts: 0.88317 against 0.88313 g/cm3), well below the warning.
    a = oa.assay_of(record("EX00008"))
    m = build_model(a)
    found = balance(check_assay(a, m), "SG")
    assert [f.severity for f in found] == ["info"]
    assert abs(m.sg_closure) < BALANCE_WARN[0]
    assert m.density_reconciliation_pct is None


def test_a_crude_gravity_off_by_001_is_named_by_check_and_not_spread_over_the_cuts():
    # The same record with its whole-crude SG raised by 0.010: the cuts cover the crude, so the balance cannot
    # close; check warns with the size, the measured cuts stay as measured (within SG 0.001 at their
    # boundaries, the development-set goal) and --scale-cuts would move them instead.
    rec = record("EX00008")
    a = oa.assay_of(rec)
    a = dataclasses.replace(a, sg=a.sg + 0.010)
    m = build_model(a)
    found = balance(check_assay(a, m), "SG")
    assert [f.severity for f in found] == ["warning"]
    assert m.sg_closure == pytest.approx(0.010, abs=0.003)
    meas = oa.measured(rec)["sg"]
    from assaycut.yields import run_yields

    got = np.asarray(run_yields(a, oa.own_cut_set(rec), model=m).cuts.column("sg"), dtype=float)
    assert np.max(np.abs(got - meas)) <= 0.001
    scaled = build_model(a, reconcile=True)
    assert scaled.density_reconciliation_pct == pytest.approx(100 * 0.010 / a.sg, abs=0.35)
    assert scaled.sg_closure == 0.0


def residue(findings):
    return [f for f in findings if "above the narrow cuts" in f.message or "Watson K of" in f.message]


def test_real_assays_residue_agrees_with_their_gravity():
    # Source: the development set (NOAA ADIOS, CC0).  A real assay hangs together: given its cuts to 650 °F only,
    # the part above them takes an SG the crude gravity allows (between the diesel's and 1.10), and with
    # whole-crude data only the fitted Watson K lies among crude oils' (10.5-13); no residue warning.
    for rec in oa.records():
        upto = [k for k, c in enumerate(rec["cuts"]) if c["end_f"] is not None and c["end_f"] <= 650.0]
        for keep in (upto, []):
            a = oa.assay_of(rec, keep)
            found = residue(check_assay(a, build_model(a)))
            assert all(f.severity == "info" for f in found), (rec["name"], [f.message for f in found])
            assert len(found) == (1 if keep else 0)


def test_a_residue_too_small_for_the_gravity_is_named():
    # Mass balance: with its cuts to 650 °F given as adding up to 97 vol % (their yields scaled up), the 3 %
    # left above them would need an SG far above any residue's to meet the record's crude gravity (the record's
    # own cuts give 0.92-0.95 there; common practice: residues stay below about 1.10).
    rec = record("EX00004")
    upto = [k for k, c in enumerate(rec["cuts"]) if c["end_f"] is not None and c["end_f"] <= 650.0]
    a = oa.assay_of(rec, upto)
    nc = a.narrow_cuts
    scaled = dataclasses.replace(a, narrow_cuts=dataclasses.replace(nc, vol_pct=nc.vol_pct * 97.0 / nc.vol_pct.sum()))
    found = residue(check_assay(scaled, build_model(scaled)))
    assert [f.severity for f in found] == ["warning"]
    assert "too small for the gravity" in found[0].message and "3 vol %" in found[0].message
