"""The Riazi distribution fit (Riazi, Ind. Eng. Chem. Res. 28 (1989) 1731)."""

from __future__ import annotations

import numpy as np
import pytest

from assaycut.methods.riazi_distribution import fit_riazi_distribution


def test_riazi_fit_recovers_parameters():
    # Identity: points generated from the Riazi distribution (Riazi MNL50 §4.5 form) are fitted back.
    x = np.array([0.03, 0.1, 0.25, 0.45, 0.6, 0.75])
    t = 320.0 * (1 + (4.0 / 1.8 * np.log(1 / (1 - x))) ** (1 / 1.8)) - 273.15
    f = fit_riazi_distribution(100 * x, t)
    assert f.t0_k == pytest.approx(320.0, rel=2e-3)
    assert f.b == pytest.approx(1.8, rel=1e-2)
    assert f.rms_c < 0.05
