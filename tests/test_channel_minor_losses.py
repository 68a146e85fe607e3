"""Checks of models.minor_losses (entrance Kc, exit Ke of a plate-fin channel row).

sigma is the free-flow AREA ratio; both coefficients multiply the channel velocity head.
(Kept under the test_channel* name as the channel module's entry/exit losses.)
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from models.minor_losses import entrance_loss_coefficient, exit_loss_coefficient

SIGMA = np.round(np.arange(0.0, 0.95, 0.1), 2)
# Contraction coefficients of a plane (two-dimensional) sharp-edged contraction versus area
# ratio, von Mises (1917) free-streamline theory, as tabulated in hydraulics texts -- values
# recalled from memory.
VON_MISES_CC = np.array([0.611, 0.612, 0.616, 0.622, 0.631, 0.644, 0.662, 0.687, 0.722, 0.781])


def test_kc_vs_kays_vena_contracta_theory(check):
    # Kays (1950), Trans. ASME 72:1067: for a uniform profile (Re -> inf, momentum coefficient
    # Kd = 1) Kc = (1 - 2 Cc + Cc^2 (2 Kd - 1)) / Cc^2 = (1/Cc - 1)^2; the Re -> inf curves of
    # Kays & London (1984) Figs. 5-2..5-4 come from this theory. Tolerance 0.02 absolute (about
    # the reading accuracy of those charts; measured deviation 0.015).
    kd = 1.0
    kc_theory = (1.0 - 2.0 * VON_MISES_CC + VON_MISES_CC**2 * (2.0 * kd - 1.0)) / VON_MISES_CC**2
    check(
        "Kc, plate-fin entrance, sigma 0..0.9",
        entrance_loss_coefficient(np.where(SIGMA == 0.0, 1e-12, SIGMA)),
        kc_theory,
        "Kays (1950) theory with von Mises plane Cc (Cc recalled from memory)",
        atol=0.02,
    )


def test_kc_limit_sigma_to_zero_kirchhoff_slot(check):
    # sigma -> 0: jet from a large space through a 2-D slot; Kirchhoff's free-streamline
    # solution Cc = pi / (pi + 2) gives Kc = (1/Cc - 1)^2 = (2/pi)^2 = 0.405. Tolerance 4 %
    # (0.42 is the rounded coefficient of the form used; deviation 3.6 %).
    cc = math.pi / (math.pi + 2.0)
    check(
        "Kc as sigma -> 0",
        entrance_loss_coefficient(1e-9),
        (1.0 / cc - 1.0) ** 2,
        "Kirchhoff (1869) free-streamline slot, Cc = pi/(pi+2)",
        rtol=0.04,
    )


def test_ke_vs_borda_carnot_momentum(check):
    # Kays (1950): Ke = 1 - 2 Kd sigma + sigma^2, with Kd = 1 for a uniform exit profile
    # (Borda-Carnot). Exact closed form -> tolerance 1e-12.
    s = np.array([0.05, 0.2, 0.5, 0.8, 0.95])
    check(
        "Ke momentum (Borda-Carnot), sigma 0.05..0.95",
        exit_loss_coefficient(s),
        1.0 - 2.0 * 1.0 * s + s**2,
        "Kays (1950) / Borda-Carnot momentum balance, Kd = 1",
        rtol=1e-12,
    )


def test_limits(check):
    # sigma -> 1: no area change, no loss (both coefficients 0).
    check("Kc at sigma = 1", entrance_loss_coefficient(1.0), 0.0, "no area change", atol=1e-15)
    check("Ke at sigma = 1", exit_loss_coefficient(1.0), 0.0, "no area change", atol=1e-15)
    # sigma -> 0: discharge into a large space loses the whole velocity head (Ke -> 1,
    # Borda-Carnot); tolerance 1e-8 at sigma = 1e-9.
    check(
        "Ke as sigma -> 0",
        exit_loss_coefficient(1e-9),
        1.0,
        "Borda-Carnot: full velocity head lost",
        atol=1e-8,
    )


def test_literature_sigma_squared_form(check):
    # Culham & Muzychka (2001), IEEE Trans. CPT 24:159: Ke = (1 - sigma^2)^2 (recalled from
    # memory). Reproduced exactly when asked for; larger than the momentum result.
    s = np.array([0.5, 0.8])
    check(
        "Ke, sigma-squared form",
        exit_loss_coefficient(s, form="literature_sigma_squared"),
        (1.0 - s**2) ** 2,
        "Culham & Muzychka (2001) form, recalled from memory",
        rtol=1e-12,
    )
    assert np.all(exit_loss_coefficient(s, "literature_sigma_squared") > exit_loss_coefficient(s))


def test_validity_edges():
    bad = np.array([0.0, -0.1, 1.0 + 1e-12, np.nan])
    assert np.isnan(entrance_loss_coefficient(bad)).all()
    assert np.isnan(exit_loss_coefficient(bad)).all()
    assert np.isfinite(entrance_loss_coefficient(np.array([1e-12, 1.0]))).all()
    with pytest.raises(ValueError, match="form"):
        exit_loss_coefficient(0.5, form="sigma")  # type: ignore[arg-type]
