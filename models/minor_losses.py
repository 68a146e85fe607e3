"""Entrance (contraction) and exit (expansion) loss coefficients of a plate-fin channel array.

Convention used throughout finfront:

* sigma is the free-flow AREA ratio, sigma = (flow area between the fins) / (frontal area of
  the duct just upstream/downstream); for a ducted sink with fins of thickness t at pitch p,
  sigma = b / p = 1 - t/p for a periodic array (``models.geometry`` uses the whole array,
  (N - 1) s / W, which counts the outer fins). It is not a linear (diameter-like) ratio.
* Kc and Ke multiply the velocity head IN THE CHANNELS, rho V_channel^2 / 2.
* They are Kays & London's irreversible coefficients: with them the static pressure drop
  over the sink is dp = (Kc + 4 f_app L/Dh + Ke) rho V^2 / 2 for constant density (the
  reversible (1 - sigma^2) acceleration and recovery terms cancel between inlet and outlet).

Which power of sigma, and why:

* Kc = 0.42 (1 - sigma^2). For a row of two-dimensional slot entrances (plate fins) the
  vena-contracta theory Kc = (1/Cc - 1)^2 with von Mises' plane contraction coefficients Cc
  gives 0.405, 0.389, 0.342, 0.261, 0.148 at sigma = 0, 0.2, 0.4, 0.6, 0.8; 0.42 (1 - sigma^2)
  follows these within 0.015. (For round tubes, Weisbach's Cc follow 0.42 (1 - sigma) instead;
  that is White's formula written with the diameter ratio, d^2/D^2 = sigma.)
* Ke = (1 - sigma)^2, the Borda-Carnot momentum result for a uniform velocity leaving the
  channels: Kays & London's Re -> infinity curve. The form (1 - sigma^2)^2 used in several
  plate-fin heat-sink papers (e.g. Culham & Muzychka 2001) squares the area
  ratio a second time and is larger than the momentum result (0.13 instead of 0.04 at
  sigma = 0.8); it is available as ``form='literature_sigma_squared'`` to reproduce those
  papers.
* Kays & London's laminar curves assume a fully developed profile at the channel exit. Webb &
  Paek (2003, IPACK2003-35354) showed that for the developing flow in heat sinks those values
  over-estimate Kc and Ke, by a small amount. Using the uniform-profile (Re -> infinity) forms
  at all Reynolds numbers is our choice, not a published recommendation.
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

FloatArray = NDArray[np.float64]

_KC_SLOT = 0.42


def entrance_loss_coefficient(sigma: ArrayLike) -> FloatArray:
    """Return the entrance (sudden contraction) loss coefficient Kc of a plate-fin channel row.

    Formula::

        Kc = 0.42 (1 - sigma^2),   sigma = channel flow area / upstream frontal area

    Kc multiplies the CHANNEL velocity head rho V_ch^2 / 2 and excludes the reversible
    (1 - sigma^2) acceleration term (Kays & London's convention, see the module docstring).

    Parameters
    ----------
    sigma : array_like
        Free-flow area ratio, dimensionless, 0 < sigma <= 1.

    Returns
    -------
    ndarray
        Kc, dimensionless, from 0.42 (sigma -> 0) to 0 (sigma = 1).

    Validity
    --------
    Uniform (high-Reynolds-number) velocity profile, sharp-edged two-dimensional slot entrances
    (plate fins with square leading edges). Within 0.015 of the vena-contracta theory with von
    Mises' plane contraction coefficients for 0 <= sigma <= 0.9. sigma outside (0, 1] or NaN:
    NaN.

    Source: Kays, W. M. (1950), "Loss coefficients for abrupt changes in flow cross section
    with low Reynolds number flow in single and multiple-tube systems", Trans. ASME 72:1067
    (Kc = (1/Cc - 1)^2 for a uniform profile), as plotted in Kays & London (1984), Compact Heat
    Exchangers, 3rd ed., Figs. 5-2 to 5-4 (Re -> infinity curves); form 0.42 (1 - sigma^2) as
    used for plate-fin heat sinks by Culham & Muzychka (2001), IEEE Trans. Compon. Packag.
    Technol. 24:159-165.

    Example
    -------
    >>> round(float(entrance_loss_coefficient(0.8)), 3)   # von Mises Cc = 0.722 -> 0.148
    0.151
    """
    s = np.asarray(sigma, dtype=float)
    ok = (s > 0.0) & (s <= 1.0)
    return np.where(ok, _KC_SLOT * (1.0 - s * s), np.nan)


def exit_loss_coefficient(
    sigma: ArrayLike, form: Literal["momentum", "literature_sigma_squared"] = "momentum"
) -> FloatArray:
    """Return the exit (sudden expansion) loss coefficient Ke of a plate-fin channel row.

    Formula::

        form='momentum' (default):          Ke = (1 - sigma)^2      (Borda-Carnot)
        form='literature_sigma_squared':    Ke = (1 - sigma^2)^2

    with sigma = channel flow area / downstream frontal area. Ke multiplies the CHANNEL
    velocity head rho V_ch^2 / 2 and excludes the reversible (1 - sigma^2) recovery term.

    Parameters
    ----------
    sigma : array_like
        Free-flow area ratio, dimensionless, 0 < sigma <= 1.
    form : {'momentum', 'literature_sigma_squared'}
        Which expression (not an array; a bad value raises ValueError). See module docstring.

    Returns
    -------
    ndarray
        Ke, dimensionless, from 1 (sigma -> 0: the whole velocity head is lost) to 0 (sigma = 1).

    Validity
    --------
    Uniform velocity profile at the channel exit (Kays & London's Re -> infinity curve; for
    a fully developed laminar profile their Ke is lower, even negative at large sigma).
    sigma outside (0, 1] or NaN: NaN.

    Source: Borda-Carnot sudden-expansion loss from the momentum balance, Ke = 1 - 2 Kd sigma
    + sigma^2 with Kd = 1 (Kays 1950, Trans. ASME 72:1067; Kays & London 1984, Compact Heat
    Exchangers, Figs. 5-2 to 5-4); the squared form from Culham & Muzychka (2001).

    Example
    -------
    >>> round(float(exit_loss_coefficient(0.8)), 3)   # (1 - 0.8)^2
    0.04
    """
    s = np.asarray(sigma, dtype=float)
    if form == "momentum":
        val = (1.0 - s) ** 2
    elif form == "literature_sigma_squared":
        val = (1.0 - s * s) ** 2
    else:
        raise ValueError(f"form: got {form!r}, expected 'momentum' or 'literature_sigma_squared'")
    ok = (s > 0.0) & (s <= 1.0)
    return np.where(ok, val, np.nan)
