"""The words of the report that do not come from the run: cautions, accuracy band, references.

The accuracy band is the accuracy the authors of the model's correlations state, as quoted in
the ``models/`` docstrings; the references are the published sources those docstrings cite.
"""

from __future__ import annotations

# (part of the model, stated accuracy, where the statement is; models/ file)
ACCURACY = (
    ("Heat transfer in laminar channel flow (developing flow, combined entry)",
     "±10 % or better", "Muzychka & Yovanovich (2004), authors' statement",
     "models/channel_heat.py"),
    ("Friction in laminar developing channel flow",
     "10 % or better", "Muzychka & Yovanovich (2009), authors' statement",
     "models/channel_friction.py"),
    ("Friction in turbulent channel flow (hydraulic-diameter approximation)",
     "duct-shape effects of order 10 % not modelled", "Petukhov (1970)",
     "models/channel_friction.py"),
    ("Transition between Re = 2300 and Re = 10 000",
     "no stated accuracy (interpolation)", "Gnielinski (2013)", "models/channel.py"),
    ("Flow bypass around an unducted sink",
     "an estimate; main uncertainty the clearance's entrance and exit losses",
     "after Simons (2004)", "models/bypass.py"),
    ("Radiation with the fan stopped, bare metal",
     "up to about 35 % high (within 5 % for anodised or painted)",
     "measured against a radiosity solution in the tests", "models/natural.py"),
)
ACCURACY_BAND = "±10 %"  # the correlations' stated accuracy, at best, inside their ranges

CAUTIONS = (
    ("The model's accuracy band",
     "The heat-transfer and friction correlations behind these numbers are stated by their "
     f"authors to be accurate to about {ACCURACY_BAND} inside their published ranges, at best "
     "(table below). Read every thermal resistance, temperature rise, pressure drop and "
     f"operating point in this report as {ACCURACY_BAND} or wider, and wider still for the "
     "designs listed under \u201cDesigns outside the published ranges\u201d. Fan curves are as "
     "good as the fan data sheet; material conductivity as good as the extruder's data."),
    ("Build and measure a prototype",
     "A design chosen here must be built and measured (temperatures at the sources, pressure "
     "drop, air flow) before it is released. The model does not see manufacturing tolerances, "
     "the interface material as assembled, flow maldistribution at the fan or around nearby "
     "parts, dust, or ageing."),
    ("Safety limits come from the applicable standard",
     "Touch-temperature limits for accessible surfaces and other safety limits are set by the "
     "product-safety standard that applies to the equipment \u2014 for example IEC 62368-1 for "
     "audio/video and information and communication technology equipment. This report does "
     "not check them: compare the predicted surface temperatures with that standard yourself."),
    ("Codes and licensed practice decide",
     "Local codes and licensed engineering practice decide whether a design is acceptable. "
     "This report supports that decision; it does not make it."),
)

# The published sources the model's docstrings cite (models/*.py), one plain list.
REFERENCES = (
    "Anderson, N. & Björck, \u00c5. (1973), \u201cA new high order method of regula falsi type "
    "for computing a root of an equation\u201d, BIT 13, 253\u2013264.",
    "ASHRAE Handbook \u2014 HVAC Systems and Equipment, chapter \u201cFans\u201d (fan laws, fans "
    "in series and parallel, operating point, air power).",
    "Bar-Cohen, A. & Rohsenow, W. M. (1984), J. Heat Transfer 106, 116\u2013123 (natural "
    "convection between vertical plates, optimum spacing).",
    "Brent, R. P. (1973), Algorithms for Minimization without Derivatives, ch. 4.",
    "\u00c7engel, Y. A. & Ghajar, A. J., Heat and Mass Transfer, Eqs. 9-31 to 9-33, "
    "Table 9-1.",
    "Chandrupatla, T. R. (1997), \u201cA new hybrid quadratic/bisection algorithm for finding "
    "the zero of a nonlinear function without using derivatives\u201d, Advances in Engineering "
    "Software 28(3), 145\u2013149.",
    "Culham, J. R. & Muzychka, Y. S. (2001), IEEE Trans. Compon. Packag. Technol. 24, "
    "159\u2013165 (entrance and exit losses of plate-fin heat sinks).",
    "Elenbaas, W. (1942), Physica 9, 1 (natural convection between parallel plates).",
    "Fritsch, F. N. & Butland, J. (1984), SIAM J. Sci. Stat. Comput. 5(2), 300\u2013304.",
    "Fritsch, F. N. & Carlson, R. E. (1980), SIAM J. Numer. Anal. 17(2), 238\u2013246 "
    "(monotone interpolation of the fan curve).",
    "Gardner, K. A. (1945), \u201cEfficiency of extended surface\u201d, Trans. ASME 67, "
    "621\u2013631 (tapered fins).",
    "Gnielinski, V. (1976), \u201cNew equations for heat and mass transfer in turbulent pipe "
    "and channel flow\u201d, Int. Chem. Eng. 16, 359\u2013368.",
    "Gnielinski, V. (2013), Int. J. Heat Mass Transfer 63, 134\u2013140 (laminar\u2013turbulent "
    "transition); VDI Heat Atlas (2010), chapter G1.",
    "Harper & Brown (1922), NACA Report 158 (corrected fin length).",
    "Incropera, F. P., DeWitt, D. P., Bergman, T. L. & Lavine, A. S., Fundamentals of Heat "
    "and Mass Transfer, 6th ed. (fins, Sec. 3.6 and Table 3.4; air properties, Table A.4).",
    "Jonsson, H. & Moshfegh, B. (2001), IEEE Trans. Compon. Packag. Technol. 24(2), "
    "142\u2013149 (measured flow bypass; background).",
    "Kays, W. M. (1950), \u201cLoss coefficients for abrupt changes in flow cross section with "
    "low Reynolds number flow in single and multiple-tube systems\u201d, Trans. ASME 72, 1067.",
    "Kays, W. M. & London, A. L. (1984), Compact Heat Exchangers, 3rd ed. "
    "(effectiveness\u2013NTU, ch. 2; entrance and exit losses, Figs. 5-2 to 5-4; core pressure "
    "drop).",
    "Kraus, A. D., Aziz, A. & Welty, J. (2001), Extended Surface Heat Transfer.",
    "Kraus, A. D., \u201cCooling Electronic Equipment\u201d, Mechanical Engineers' Handbook "
    "vol. 4 (M. Kutz, ed.).",
    "Lee, S. (1995), \u201cOptimum design and selection of heat sinks\u201d, IEEE Trans. Compon. "
    "Packag. Manuf. Technol. A 18(4), 812\u2013817.",
    "Lee, S. (1998), \u201cCalculating spreading resistance in heat sinks\u201d, Electronics "
    "Cooling 4(1).",
    "Lee, S., Song, S., Au, V. & Moran, K. P. (1995), \u201cConstriction/spreading resistance "
    "model for electronics packaging\u201d, Proc. ASME/JSME Thermal Engineering Joint Conf., "
    "Vol. 4, 199\u2013206.",
    "Lemmon, E. W. & Jacobsen, R. T. (2004), Int. J. Thermophys. 25, 21 (viscosity and "
    "thermal conductivity of air).",
    "Lemmon, E. W., Jacobsen, R. T., Penoncello, S. G. & Friend, D. G. (2000), J. Phys. Chem. "
    "Ref. Data 29, 331 (thermodynamic properties of air).",
    "McAdams, W. H., vertical-plate natural convection, Nu = 0.59 Ra^(1/4) (as quoted by "
    "\u00c7engel & Ghajar).",
    "Moler, C. (2004), Numerical Computing with MATLAB, sec. 3.6.",
    "Muzychka, Y. S., Culham, J. R. & Yovanovich, M. M. (2003), \u201cThermal spreading "
    "resistance of eccentric heat sources on rectangular flux channels\u201d, J. Electronic "
    "Packaging 125, 178\u2013185.",
    "Muzychka, Y. S. & Yovanovich, M. M. (2004), \u201cLaminar forced convection heat transfer "
    "in the combined entry region of non-circular ducts\u201d, J. Heat Transfer 126, 54\u201361.",
    "Muzychka, Y. S. & Yovanovich, M. M. (2009), \u201cPressure drop in laminar developing flow "
    "in noncircular ducts: a scaling and modeling approach\u201d, J. Fluids Eng. 131, 111105.",
    "Petukhov, B. S. (1970), \u201cHeat transfer and friction in turbulent pipe flow with "
    "variable physical properties\u201d, Advances in Heat Transfer 6, 503\u2013564.",
    "Press, W. H. et al., Numerical Recipes, 3rd ed., sec. 5.6.",
    "Shah, R. K. & London, A. L. (1978), Laminar Flow Forced Convection in Ducts, Academic "
    "Press.",
    "Simons, R. E. (2004), \u201cEstimating the effect of flow bypass on parallel plate-fin heat "
    "sink performance\u201d, ElectronicsCooling 10(1).",
    "Simons, R. E. & Schmidt, R. R. (1997), \u201cA simple method to estimate heat sink air flow "
    "bypass\u201d, ElectronicsCooling 3(2).",
    "The Aluminum Association, Aluminum Standards and Data (typical alloy properties); EN "
    "1050A data sheet; ASM Metals Handbook (copper C11000).",
    "U.S. Standard Atmosphere, 1976 (air pressure and temperature at altitude).",
    "Webb & Paek (2003), IPACK2003-35354 (entrance and exit losses of heat sinks).",
    "White, F. M., Viscous Fluid Flow, 3rd ed., ch. 3.",
    "Yovanovich, M. M., Muzychka, Y. S. & Culham, J. R. (1999), \u201cSpreading resistance of "
    "isoflux rectangles and strips on compound flux channels\u201d, J. Thermophysics Heat "
    "Transfer 13(4), 495\u2013500.",
)

REFERENCES_NOTE = (
    "Where the model's documentation says that a source was recalled from memory or was not at "
    "hand, the equation was re-derived and is checked in the tests against an independent "
    "solution; docs/validation.md lists every check with its source and tolerance.")
