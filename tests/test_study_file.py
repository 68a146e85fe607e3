"""Study files: unit conversion against published definitions, the bad-study-file corpus (one
small YAML per case, each message one line naming the key path, the bad value and what was
expected), the shipped studies, and the frozen (resolved) study's round trip."""

from __future__ import annotations

import dataclasses
import re
from pathlib import Path

import pytest
import yaml
from hypothesis import given, settings
from hypothesis import strategies as st

from optim.study import StudyError, column_kind, load_study
from optim.units import format_quantity, parse_quantity, to_si

ROOT = Path(__file__).resolve().parents[1]
FT = 0.3048  # m, exact: international foot (1959 international yard and pound agreement)
INCH = 0.0254  # m, exact, same agreement

# A small valid study; every case of the corpus changes one thing in it.
BASE = """\
study:
  name: corpus
  objectives:
    - minimise: junction_temperature_K
envelope:
  base_width: "100 mm"
  flow_length: "100 mm"
  max_height: "50 mm"
material: "6063-T5"
design_space:
  fin_count: [10, 25]
  fin_thickness_root: ["1.5 mm", "3 mm"]
  fin_height: ["20 mm", "40 mm"]
  base_thickness: ["5 mm", "10 mm"]
air:
  ambient: "40 degC"
  fans:
    - name: fan_a
      curve_units: [CFM, inH2O]
      curve: [[0, 0.8], [20, 0.5], [40, 0]]
sources:
  - name: chip
    power: "100 W"
    footprint: ["30 mm", "30 mm"]
    max_junction: "125 degC"
"""

TWO_SOURCES = """\
  - name: other
    power: "50 W"
    footprint: ["30 mm", "30 mm"]
    position: ["60 mm", "50 mm"]
    max_junction: "125 degC"
"""


def _write(tmp_path: Path, name: str, text: str) -> Path:
    path = tmp_path / f"{name}.yaml"
    path.write_text(text)
    return path


def _line(text: str, needle: str) -> int:
    return next(i for i, line in enumerate(text.splitlines(), 1) if needle in line)


# ------------------------------------------------------------------ units vs outside references


def test_cfm_is_exactly_a_cubic_foot_per_minute(check):
    # definition: 1 ft = 0.3048 m exactly, so 1 ft^3/min = 0.3048^3 / 60 m^3/s = 4.719474432e-4
    check("1 CFM in m^3/s", to_si("1 CFM", "flow", "k"), FT**3 / 60.0,
          "definition of the foot (0.3048 m exactly) -> 4.719474432e-4 m^3/s", rtol=1e-15)
    assert to_si("1 CFM", "flow", "k") == 4.719474432e-4
    # lower-case cfm is the same unit here, not pint's centi-fermi (a length): traps.md
    assert to_si("35 cfm", "flow", "k") == to_si("35 CFM", "flow", "k")
    assert to_si("35 ft^3/min", "flow", "k") == to_si("35 CFM", "flow", "k")


@pytest.mark.parametrize(
    "text, expected, source",
    [
        ("1 l/s", 1e-3, "definition of the litre, 1 L = 1 dm^3 (12th CGPM, 1964); exact"),
        ("3600 m^3/h", 1.0, "1 h = 3600 s; exact"),
        ("36 m3/h", 0.01, "1 h = 3600 s; exact ('m3' read as m^3)"),
    ],
)
def test_metric_flow_units(check, text, expected, source):
    # tolerance: exact definitions; the loader rounds to 15 significant digits
    check(f"{text} in m^3/s", to_si(text, "flow", "k"), expected, source, rtol=1e-15)


@pytest.mark.parametrize(
    "text, expected, source, rtol",
    [
        # conventional inch of water: rho = 1000 kg/m^3, g_n = 9.80665 m/s^2 -> 249.08891 Pa.
        # NIST SP 811 (2008), Appendix B.8, "inch of water, conventional (inH2O)":
        # 2.490 889 E+02 Pa (recalled from memory; also the en.wikipedia "Inch of water" page).
        # Printed to 7 digits: tolerance 1e-6.
        ("1 inH2O", 249.0889, "NIST SP 811 App. B.8, inch of water, conventional", 1e-6),
        ("1 inWG", 249.0889, "NIST SP 811 App. B.8, inch of water, conventional", 1e-6),
        # water at 4 degC (39.2 degF): NIST SP 811 App. B.8, 2.490 82 E+02 Pa (recalled from
        # memory); printed to 6 digits: tolerance 1e-5.
        ("1 inH2O_4C", 249.082, "NIST SP 811 App. B.8, inch of water (39.2 degF)", 1e-5),
        ("1 inH2O_39F", 249.082, "NIST SP 811 App. B.8, inch of water (39.2 degF)", 1e-5),
        # water at 60 degF: NIST SP 811 App. B.8, 2.4884 E+02 Pa (recalled from memory);
        # 5 digits: tolerance 2e-5.
        ("1 inH2O_60F", 248.84, "NIST SP 811 App. B.8, inch of water (60 degF)", 2e-5),
        # conventional millimetre of water, 9.806 65 Pa exactly (NIST SP 811 App. B.8)
        ("1 mmH2O", 9.80665, "NIST SP 811 App. B.8, millimeter of water, conventional", 1e-12),
        ("0.25 inH2O", 0.25 * 1000.0 * 9.80665 * INCH,
         "definition: 1000 kg/m^3 x 9.80665 m/s^2 x 0.0254 m (exact)", 1e-14),
    ],
)
def test_inch_of_water(check, text, expected, source, rtol):
    check(f"{text} in Pa", to_si(text, "pressure", "k"), expected, source, rtol=rtol)


@pytest.mark.parametrize(
    "text, expected",
    [
        # Fahrenheit and Celsius scales: T/K = t/degC + 273.15 and t/degF = 1.8 t/degC + 32,
        # exact by definition (ITS-90 / SI Brochure, 9th ed., sec. 2.3.1 for the Celsius offset)
        ("0 degC", 273.15),
        ("45 degC", 318.15),
        ("45 °C", 318.15),
        ("32 degF", 273.15),
        ("212 degF", 373.15),
        ("-40 degF", 233.15),
        ("-40 degC", 233.15),
        ("300 K", 300.0),
    ],
)
def test_absolute_temperatures(check, text, expected):
    check(f"{text} in K", to_si(text, "temperature", "k"), expected,
          "Celsius offset 273.15 K and Fahrenheit scale 1.8 x + 32 (definitions, exact)",
          rtol=1e-15)


@pytest.mark.parametrize(
    "text, kind, expected",
    [
        # a temperature *difference* of 1 degC is 1 K and of 1 degF is 5/9 K (definitions):
        # 0.5 degC/W must be 0.5 K/W, never 273.65 K/W (traps.md)
        ("0.5 degC/W", "thermal_resistance", 0.5),
        ("0.5 °C/W", "thermal_resistance", 0.5),
        ("0.9 degF/W", "thermal_resistance", 0.5),
        ("5 degC", "temperature_difference", 5.0),
        ("9 degF", "temperature_difference", 5.0),
        ("0.3 degC*cm^2/W", "area_resistance", 0.3e-4),
        ("0.3 K*cm²/W", "area_resistance", 0.3e-4),
        ("1 degC*in^2/W", "area_resistance", INCH * INCH),
    ],
)
def test_temperature_differences(check, text, kind, expected):
    check(f"{text} in SI", to_si(text, kind, "k"), expected,
          "1 degC = 1 K and 1 degF = 5/9 K as differences; 1 in = 25.4 mm (definitions, exact)",
          rtol=1e-14)


def test_other_thermal_units(check):
    # NIST SP 811 (2008), App. B.8: Btu_IT/(h ft degF) = 1.730 735 E+00 W/(m K)
    # (recalled from memory; printed to 7 digits: tolerance 1e-6)
    check("1 BTU/h/ft/degF in W/m/K", to_si("1 BTU/h/ft/degF", "conductivity", "k"), 1.730735,
          "NIST SP 811 App. B.8, Btu_IT per hour foot degF", rtol=1e-6)
    check("2.7 g/cm^3 in kg/m^3", to_si("2.7 g/cm^3", "density", "k"), 2700.0,
          "1 g/cm^3 = 1000 kg/m^3 (definition)", rtol=1e-15)
    check("1 LFM in m/s", to_si("1 LFM", "velocity", "k"), FT / 60.0,
          "definition of the foot, 0.00508 m/s exactly", rtol=1e-15)
    assert to_si("8 h", "time", "k") == 28800.0
    assert to_si("80 %", "number", "k") == 0.8
    assert to_si("200 W/m/K", "conductivity", "k") == to_si("200 W/(m*K)", "conductivity", "k")


@pytest.mark.parametrize(
    "text, kind, fragments",
    [
        ("35 mm", "flow", ['"35 mm" is a length', 'expected a volumetric flow such as "35 CFM"']),
        ("35 ft^3", "flow", ["is a volume"]),
        ("40 C", "temperature", ["is an electric charge", '"40 degC"']),
        ("40", "temperature", ["has no unit"]),
        ("200 W/mK", "conductivity", ["millikelvin", '"200 W/m/K"']),
        ("35 cfmm", "flow", ['unit finfront does not know ("cfmm")']),
        ("5 delta_degC", "temperature", ["is a temperature difference"]),
        ("-300 degC", "temperature", ["absolute zero"]),
        ("8 parsecs", "time", ["is a length", "expected a duration"]),
    ],
)
def test_to_si_refuses_wrong_kinds(text, kind, fragments):
    with pytest.raises(StudyError) as err:
        to_si(text, kind, "some.key")
    msg = str(err.value)
    assert msg.startswith("some.key: ") and "\n" not in msg
    for f in fragments:
        assert f in msg


@settings(max_examples=100, deadline=None)
@given(
    st.floats(min_value=1e-6, max_value=1e6, allow_nan=False, allow_infinity=False),
    st.sampled_from([("mm", "length"), ("degC", "temperature"), ("CFM", "flow"),
                     ("inH2O", "pressure"), ("K*cm^2/W", "area_resistance"), ("h", "time")]),
)
def test_format_reads_back_exactly(x, unit_kind):
    unit, kind = unit_kind
    si = parse_quantity(f"{x!r} {unit}", kind)[0]
    assert parse_quantity(format_quantity(si, kind), kind)[0] == si


def test_column_kinds():
    assert column_kind("junction_temperature_K") == "temperature"
    assert column_kind("junction_temperature_leg_a_K") == "temperature"
    assert column_kind("junction_margin_K") == "temperature_difference"
    assert column_kind("fin_tip_temperature_K") == "temperature_difference"
    assert column_kind("sink_resistance_K_per_W") == "thermal_resistance"
    assert column_kind("channel_velocity_m_per_s") == "velocity"
    assert column_kind("flow_m3_per_s") == "flow"
    assert column_kind("mass_kg") == "mass"
    assert column_kind("reynolds_number") == "number"


# ------------------------------------------------------------------ YAML reading


def test_yaml_is_read_the_yaml_1_2_way(tmp_path):
    # PyYAML (YAML 1.1) reads 1e-3 as a string, 012 as octal 10 and "no" as False (traps.md)
    text = BASE.replace("  name: corpus\n", "  name: corpus\n  seed: 012\n") + (
        "surface:\n  emissivity: 8.5e-1\n"
    )
    s = load_study(_write(tmp_path, "yaml12", text))
    assert s.seed == 12
    assert s.scenarios[0].conditions.surface_emissivity == 0.85
    bad = BASE.replace('  ambient: "40 degC"\n', '  ambient: "40 degC"\n  fin_tips: no\n')
    with pytest.raises(StudyError, match=r'air\.fin_tips: "no" is not allowed'):
        load_study(_write(tmp_path, "no", bad))


def test_sources_of_a_study():
    base = load_study(BASE)  # YAML text
    assert load_study(yaml.safe_load(BASE)) == base  # a dict
    with pytest.raises(StudyError, match=r"no such file; expected a study file"):
        load_study("studies/does_not_exist.yaml")


# ------------------------------------------------------------------ the bad-study-file corpus

# (case, old text in BASE, new text, fragments of the message, text whose line must be cited)
CORPUS = [
    ("yaml-syntax", "fin_count: [10, 25]", "fin_count: [10, 25", ["not valid YAML", "line "],
     None),
    ("duplicate-key", '  max_height: "50 mm"\n', '  max_height: "50 mm"\n  max_height: "60 mm"\n',
     ['key "max_height" appears twice', "expected each key once"], None),
    ("missing-key", '  ambient: "40 degC"\n', "",
     ["air.ambient: missing", 'expected the ambient (inlet) air temperature, such as "40 degC"'],
     None),
    ("missing-section", BASE[BASE.index("design_space:"):BASE.index("air:")], "",
     ["design_space: missing; expected the section with fin_count"], None),
    ("unknown-key", "  ambient:", "  ambiant:",
     ['air.ambiant: unknown key; did you mean "ambient"?'], "ambiant"),
    ("unknown-section", "design_space:", "desing_space:",
     ['desing_space: unknown key; did you mean "design_space"?'], "desing_space"),
    ("unknown-key-no-match", '  max_height: "50 mm"\n', '  max_height: "50 mm"\n  colour: red\n',
     ["envelope.colour: unknown key; expected one of: base_width, flow_length, max_height"],
     "colour"),
    ("flow-dimension", "curve: [[0, 0.8], [20, 0.5], [40, 0]]",
     'curve: [["0 CFM", "0.8 inH2O"], ["20 CFM", "0.5 inH2O"], ["35 mm", "0 inH2O"]]',
     ['air.fans[0].curve[2].flow: "35 mm" is a length; expected a volumetric flow such as '
      '"35 CFM"'], "curve:"),
    ("pressure-unit", "curve_units: [CFM, inH2O]", "curve_units: [CFM, mm]",
     ['air.fans[0].curve_units[1]: "mm" is a length; expected a pressure'], "curve_units"),
    ("temperature-unit", '"40 degC"', '"40 C"',
     ['air.ambient: "40 C" is an electric charge; expected a temperature such as "40 degC"'],
     "ambient"),
    ("no-unit", 'power: "100 W"', "power: 100",
     ['sources[0].power: 100 has no unit; expected a power such as "100 W"'], "power"),
    ("zero-size", 'base_width: "100 mm"', 'base_width: "0 mm"',
     ['envelope.base_width: "0 mm" is not greater than zero; expected a length greater than '
      "zero"], "base_width"),
    ("negative-size", 'base_thickness: ["5 mm", "10 mm"]', 'base_thickness: ["-5 mm", "10 mm"]',
     ['design_space.base_thickness[0]: "-5 mm" is not greater than zero'], "base_thickness"),
    ("inverted-bounds", 'fin_height: ["20 mm", "40 mm"]', 'fin_height: ["40 mm", "20 mm"]',
     ['design_space.fin_height: ["40 mm", "20 mm"] has its bounds inverted; expected [min, max]'
      " with min <= max"], "fin_height"),
    ("fan-curve-rises", "[[0, 0.8], [20, 0.5], [40, 0]]", "[[0, 0.8], [20, 0.9], [40, 0]]",
     ["air.fans[0].curve[1]: [20, 0.9]: the pressure does not fall",
      "expected pressure strictly falling as flow rises"], "curve:"),
    ("fan-curve-flow-back", "[[0, 0.8], [20, 0.5], [40, 0]]", "[[0, 0.8], [20, 0.5], [15, 0]]",
     ["air.fans[0].curve[2]: [15, 0]: the flow does not rise",
      "expected flow strictly increasing"], "curve:"),
    ("fan-curve-short", "[[0, 0.8], [20, 0.5], [40, 0]]", "[[0, 0.8], [40, 0]]",
     ["air.fans[0].curve: [[0, 0.8], [40, 0]] is not a list of points; expected at least three"],
     "curve:"),
    ("unknown-material", 'material: "6063-T5"', 'material: "6063-T55"',
     ['material: "6063-T55" is not a material finfront knows; did you mean "6063-T5"?',
      "expected one of: ", "6061-T6"], "material"),
    ("unknown-material-in-list", 'material: "6063-T5"', 'material: ["6063-T5", "6061T6"]',
     ['material[1]: "6061T6" is not a material', 'did you mean "6061-T6"?'], "material"),
    ("custom-material-key", 'material: "6063-T5"',
     'material: {name: x, conductivty: "200 W/m/K", density: "2.7 g/cm^3"}',
     ['material[0].conductivty: unknown key; did you mean "conductivity"?'], "material"),
    ("conductivity-mK", 'material: "6063-T5"',
     'material: {name: x, conductivity: "200 W/mK", density: "2.7 g/cm^3"}',
     ['material[0].conductivity: "200 W/mK"', "millikelvin",
      'expected a thermal conductivity such as "200 W/m/K"'], "material"),
    ("objective-column", "minimise: junction_temperature_K", "minimise: junction_temp_K",
     ['study.objectives[0].minimise: "junction_temp_K" names no numeric column',
      'did you mean "junction_temperature_K"?'], "junction_temp_K"),
    ("objective-flag", "minimise: junction_temperature_K", "maximise: valid",
     ['study.objectives[0].maximise: "valid" names no numeric column (a flag or text'],
     "valid"),
    ("objective-sense", "minimise: junction_temperature_K", "minimse: mass_kg",
     ['study.objectives[0].minimse: "minimse" is neither minimise nor maximise; did you mean '
      '"minimise"?'], "minimse"),
    ("source-off-base", '    footprint: ["30 mm", "30 mm"]\n',
     '    footprint: ["30 mm", "30 mm"]\n    position: ["10 mm", "50 mm"]\n',
     ["sources[0].position: [10 mm, 50 mm] puts the [30 mm, 30 mm] footprint off the",
      "expected a centre from 15 mm to 85 mm along the flow"], "position"),
    ("footprint-too-big", 'footprint: ["30 mm", "30 mm"]', 'footprint: ["130 mm", "30 mm"]',
     ["sources[0].footprint: [130 mm, 30 mm] is larger than the base"], "footprint"),
    ("sources-overlap", BASE[BASE.index("sources:"):],
     BASE[BASE.index("sources:"):].replace('footprint: ["30 mm", "30 mm"]',
                                           'footprint: ["30 mm", "30 mm"]\n'
                                           '    position: ["40 mm", "50 mm"]') + TWO_SOURCES,
     ['sources[1].position: [60 mm, 50 mm] makes "other" overlap sources[0] ("chip") by '
      "10 mm x 30 mm; expected footprints that do not overlap"], "60 mm"),
    ("negative-clearance", '  ambient: "40 degC"\n',
     '  ambient: "40 degC"\n  bypass_clearance: {top: "-2 mm"}\n',
     ['air.bypass_clearance.top: "-2 mm" is negative; expected a length of zero or more'],
     "bypass_clearance"),
    ("gap-at-max-fin-count", "fin_count: [10, 25]", "fin_count: [10, 40]",
     ["design_space.fin_count: upper bound 40 cannot be met: 40 fins with the thinnest roots "
      "(1.5 mm) on a 100 mm base leave a 1.03 mm root gap, below the 2 mm set by "
      "extruder.min_gap = 2 mm; expected at most 29"], "fin_count"),
    ("no-design-at-all", "fin_count: [10, 25]", "fin_count: [35, 40]",
     ["design_space.fin_count: no design in the bounds can be made: the widest root gap",
      "below the 2 mm set by extruder.min_gap"], "fin_count"),
    ("fin-height-vs-ratio", "fin_count: [10, 25]", "fin_count: [20, 25]",
     ["design_space.fin_height: upper bound 40 mm cannot be met: extruder.max_height_to_gap = 10",
      "needs a root gap of 4 mm", "expected at most"], "fin_height"),
    ("root-too-thick", 'fin_thickness_root: ["1.5 mm", "3 mm"]',
     'fin_thickness_root: ["1.5 mm", "9 mm"]',
     ["design_space.fin_thickness_root: upper bound 9 mm cannot be met: even the fewest fins "
      "(10)", "expected at most"], "fin_thickness_root"),
    ("envelope-too-low", 'max_height: "50 mm"', 'max_height: "20 mm"',
     ["envelope.max_height: 20 mm is below the lowest fin height plus the thinnest base "
      "(20 mm + 5 mm); expected at least 25 mm"], "max_height"),
    ("fin-height-vs-envelope", 'max_height: "50 mm"', 'max_height: "42 mm"',
     ["design_space.fin_height: upper bound 40 mm cannot be met: with the thinnest base (5 mm) "
      "it exceeds envelope.max_height = 42 mm; expected at most 37 mm"], "fin_height"),
    ("fixed-below-extruder", 'fin_thickness_root: ["1.5 mm", "3 mm"]',
     'fin_thickness_root: "0.8 mm"',
     ['design_space.fin_thickness_root: "0.8 mm" is below extruder.min_fin_thickness = 1 mm; '
      "expected at least 1 mm"], "fin_thickness_root"),
    ("count-and-pitch", "  fin_count: [10, 25]\n", '  fin_count: [10, 25]\n  fin_pitch: "5 mm"\n',
     ["design_space: both of fin_count and fin_pitch given; expected exactly one"],
     "design_space"),
    ("fin-count-fraction", "fin_count: [10, 25]", "fin_count: [10.5, 25]",
     ["design_space.fin_count[0]: 10.5 is not a whole number"], "fin_count"),
    ("taper-above-one", "  fin_count: [10, 25]\n",
     "  fin_count: [10, 25]\n  fin_taper_ratio: 1.2\n",
     ["design_space.fin_taper_ratio: 1.2 is out of range; expected a ratio tip/root thickness in "
      "(0, 1]"], "fin_taper_ratio"),
    ("no-air-supply", BASE[BASE.index("  fans:"):BASE.index("sources:")], "",
     ["air: gives none; expected exactly one of fans, flow or approach_velocity"], "air:"),
    ("unknown-candidate", '  ambient: "40 degC"\n', '  ambient: "40 degC"\n  candidates: [fan_b]\n',
     ['air.candidates[0]: "fan_b" is not a fan in air.fans; did you mean "fan_a"?'],
     "candidates"),
    ("shroud-and-clearance", '  ambient: "40 degC"\n',
     '  ambient: "40 degC"\n  fin_tips: shrouded\n  bypass_clearance: {top: "5 mm"}\n',
     ["air.fin_tips: is shrouded while air.bypass_clearance.top is above zero; expected open"],
     "fin_tips"),
    ("impedance-point", '  ambient: "40 degC"\n',
     '  ambient: "40 degC"\n  system_impedance: "15 Pa at 30 mm"\n',
     ['air.system_impedance: "15 Pa at 30 mm": "30 mm" is a length; expected a volumetric flow'],
     "system_impedance"),
    ("limit-unit", "", 'constraints:\n  limits: ["pressure_drop_Pa <= 60 mm"]\n',
     ['constraints.limits[0].at_most: "60 mm" is a length; expected a pressure such as '
      '"60 Pa"'], "limits"),
    ("limit-column", "", 'constraints:\n  limits: ["pressure_drp_Pa <= 60 Pa"]\n',
     ['constraints.limits[0].column: "pressure_drp_Pa" names no numeric column',
      'did you mean "pressure_drop_Pa"?'], "limits"),
    ("source-name", "name: chip", "name: chip one",
     ['sources[0].name: "chip one" is not allowed here; expected a name of letters, digits and _'],
     "chip one"),
    ("junction-below-ambient", "", 'scenarios:\n  - name: nominal\n  - name: oven\n'
     '    ambient: "130 degC"\n',
     ['sources[0].max_junction: "125 degC" is not above the ambient of scenario "oven" '
      "(130 degC); expected a limit above every ambient"], "max_junction"),
    ("fan-stopped-first", "", "scenarios:\n  - name: off\n    fan_stopped: true\n",
     ["scenarios[0].fan_stopped: true in the first scenario; expected the nominal scenario "
      "first"], "fan_stopped"),
    ("altitude-range", "", 'scenarios:\n  - name: space\n    altitude: "20 km"\n',
     ['scenarios[0].altitude: "20 km" is out of range; expected an altitude from "-500 m" to '
      '"11000 m"'], "altitude"),
    ("no-stopping-rule", "  objectives:\n",
     "  budget: {generations: null}\n  objectives:\n",
     ["study.budget: has no stopping rule; expected at least one of generations"], "budget"),
    ("wall-time-unit", "  objectives:\n", '  budget: {wall_time: "8 parsecs"}\n  objectives:\n',
     ['study.budget.wall_time: "8 parsecs" is a length; expected a duration such as "8 h"'],
     "budget"),
    ("budget-type", "  objectives:\n", "  budget: {population: many}\n  objectives:\n",
     ['study.budget.population: "many" is not a whole number; expected a whole number of '
      "designs"], "budget"),
    ("method-name", "  objectives:\n", "  budget: {method: genetic}\n  objectives:\n",
     ['study.budget.method: "genetic" is not allowed; expected one of: auto, nsga2, nsga3, '
      "sweep, random"], "budget"),
    ("finish-name", "", "surface: {finish: black anodised}\n",
     ['surface.finish: "black anodised" is not allowed; did you mean "black_anodised"?; '
      "expected one of: bare_aluminium"], "finish"),
]


@pytest.mark.parametrize("case, old, new, fragments, line_of", CORPUS, ids=[c[0] for c in CORPUS])
def test_bad_study_file(tmp_path, case, old, new, fragments, line_of):
    if old:
        assert old in BASE, f"corpus case {case}: {old!r} not in the base study"
        text = BASE.replace(old, new, 1)
    else:
        text = BASE + new
    path = _write(tmp_path, case, text)
    with pytest.raises(StudyError) as err:
        load_study(path)
    msg = str(err.value)
    assert "\n" not in msg, msg
    assert "expected" in msg, msg
    for f in fragments:
        assert f in msg, f"{case}: {f!r} not in {msg!r}"
    if line_of is not None:
        assert msg.endswith(f"(line {_line(text, line_of)})"), msg


def test_message_names_a_fan_count_the_model_agrees_with():
    """The 'at most N fins' of the gap message is the largest N whose root gap, computed by
    models.geometry (the function that evaluates gap_root_m), meets extruder.min_gap."""
    from models.geometry import plate_fin_geometry

    with pytest.raises(StudyError) as err:
        load_study(BASE.replace("fin_count: [10, 25]", "fin_count: [10, 40]"))
    n_max = int(re.search(r"expected at most (\d+)", str(err.value)).group(1))
    gaps = [
        float(plate_fin_geometry(n, 1.5e-3, 1.5e-3, 0.02, 0.005, 0.1, 0.1).gap_root_m)
        for n in (n_max, n_max + 1)
    ]
    assert gaps[0] >= 2e-3 > gaps[1]
    load_study(BASE.replace("fin_count: [10, 25]", f"fin_count: [10, {n_max}]"))


# ------------------------------------------------------------------ what a good file becomes


def test_defaults_and_derived_constraints():
    s = load_study(BASE)
    by_label = {c.label: c for c in s.constraints}
    assert by_label["constraints.min_junction_margin"] == dataclasses.replace(
        by_label["constraints.min_junction_margin"], column="junction_margin_K", sense=">=",
        limit=0.0)
    assert (by_label["extruder.min_gap"].column, by_label["extruder.min_gap"].sense,
            by_label["extruder.min_gap"].limit) == ("gap_root_m", ">=", 0.002)
    assert by_label["extruder.max_height_to_gap"].column == "fin_height_to_gap_ratio"
    assert by_label["envelope.max_height"].limit == 0.05
    assert [sc.name for sc in s.scenarios] == ["nominal"]
    c = s.scenarios[0].conditions
    assert c.supply.mode == "fan" and s.fan_names == ("fan_a",) and s.fixed["fan"] == "fan_a"
    assert s.fixed["material"] == "6063-T5" and s.fixed["fin_taper_ratio"] == 1.0
    assert c.sources[0].x_m == 0.05 and c.sources[0].y_m == 0.05  # centred by default
    assert c.fin_tip == "shrouded" and c.clearance_top_m == 0.0
    assert [v.name for v in s.variables] == [
        "fin_count", "fin_thickness_root_m", "fin_height_m", "base_thickness_m"]
    assert s.budget.generations == 100
    # fan curve in SI: 0.8 inH2O (conventional) and 20 CFM
    assert c.supply.fans[0].pressure_Pa[0] == pytest.approx(0.8 * 249.08891, rel=1e-14)
    assert c.supply.fans[0].flow_m3_per_s[1] == pytest.approx(20 * FT**3 / 60, rel=1e-14)


def test_extruder_minimums_tighten_bounds_and_add_tip_constraint():
    text = BASE.replace('["1.5 mm", "3 mm"]', '["0.8 mm", "3 mm"]').replace(
        "  fin_height:", "  fin_taper_ratio: [0.5, 1]\n  fin_height:")
    s = load_study(text)
    root = next(v for v in s.variables if v.name == "fin_thickness_root_m")
    assert root.lower == 0.001  # raised to extruder.min_fin_thickness (default 1 mm)
    assert s.resolved["design_space"]["fin_thickness_root"] == ["1 mm", "3 mm"]
    tip = [c for c in s.constraints if c.label == "extruder.min_fin_thickness"]
    assert tip and tip[0].column == "fin_thickness_tip_m" and tip[0].limit == 0.001


def test_scenarios_fan_laws_altitude_and_fan_stopped(check):
    from fluids.atmosphere import ATMOSPHERE_1976

    text = BASE.replace('curve: [[0, 0.8], [20, 0.5], [40, 0]]',
                        'curve: [[0, 0.8], [20, 0.5], [40, 0]]\n      power: "5 W"') + (
        "scenarios:\n  - name: nominal\n  - name: hot_high\n    ambient: \"55 degC\"\n"
        "    altitude: \"3000 m\"\n    fan_speed: \"80 %\"\n    power_scale: 1.2\n"
        "  - name: fan_stopped\n    ambient: \"25 degC\"\n    fan_stopped: true\n")
    s = load_study(text)
    nominal, hot, off = (sc.conditions for sc in s.scenarios)
    check("standard-atmosphere pressure at 3000 m", hot.ambient_pressure_Pa,
          ATMOSPHERE_1976(3000.0).P, "fluids.atmosphere.ATMOSPHERE_1976(3000).P",
          rtol=1e-9)  # the same closed form of the 1976 standard: agreement to rounding
    assert nominal.ambient_pressure_Pa == 101325.0
    assert hot.ambient_temperature_K == pytest.approx(328.15, abs=1e-12)
    # fan affinity laws (common practice; e.g. ASHRAE Handbook, HVAC Systems and Equipment,
    # Fans chapter): flow ~ n, pressure ~ n^2, power ~ n^3
    f0, f1 = nominal.supply.fans[0], hot.supply.fans[0]
    assert f1.flow_m3_per_s == pytest.approx([0.8 * q for q in f0.flow_m3_per_s], rel=1e-14)
    assert f1.pressure_Pa == pytest.approx([0.64 * p for p in f0.pressure_Pa], rel=1e-14)
    assert f1.power_W == pytest.approx(5.0 * 0.8**3, rel=1e-14)
    assert hot.sources[0].power_W == pytest.approx(120.0, rel=1e-14)
    assert off.supply.mode == "stopped" and off.ambient_temperature_K == 298.15
    assert s.scenarios[0].name == "nominal"


def test_interface_resistance_per_area_or_per_footprint():
    per_area = load_study(BASE.replace('    max_junction: "125 degC"',
                                       '    interface_resistance: "0.45 K*cm^2/W"\n'
                                       '    max_junction: "125 degC"'))
    absolute = load_study(BASE.replace('    max_junction: "125 degC"',
                                       '    interface_resistance: "0.05 K/W"\n'
                                       '    max_junction: "125 degC"'))
    # 0.05 K/W over a 30 mm x 30 mm footprint = 0.05 * 9 cm^2 = 0.45 K cm^2/W
    r1 = per_area.scenarios[0].conditions.sources[0].interface_resistance_K_m2_per_W
    r2 = absolute.scenarios[0].conditions.sources[0].interface_resistance_K_m2_per_W
    assert r1 == pytest.approx(0.45e-4, rel=1e-14) and r2 == pytest.approx(r1, rel=1e-14)


def test_pitch_flow_and_velocity_modes():
    s = load_study(BASE.replace("fin_count: [10, 25]", 'fin_pitch: ["4 mm", "9 mm"]'))
    assert s.variables[0].name == "fin_pitch_m" and s.variables[0].upper == 0.009
    air = BASE[BASE.index("  fans:"):BASE.index("sources:")]
    flow = load_study(BASE.replace(air, '  flow: "30 CFM"\n  pressure: "95 kPa"\n'))
    c = flow.scenarios[0].conditions
    assert (c.supply.mode, c.ambient_pressure_Pa) == ("flow", 95000.0)
    assert flow.fan_names == () and "fan" not in flow.fixed
    vel = load_study(BASE.replace(air, '  approach_velocity: "400 LFM"\n'))
    assert vel.scenarios[0].conditions.supply.velocity_m_per_s == pytest.approx(400 * FT / 60)


def test_objectives_and_limits_on_per_source_columns():
    text = BASE.replace("minimise: junction_temperature_K",
                        "minimise: junction_temperature_chip_K\n    - maximize: fin_efficiency")
    text += 'constraints:\n  limits:\n    - "junction_margin_chip_K >= 10 degC"\n' \
            '    - {column: reynolds_number, at_most: 2300}\n'
    s = load_study(text)
    assert [(o.column, o.sense) for o in s.objectives] == [
        ("junction_temperature_chip_K", "min"), ("fin_efficiency", "max")]
    lims = [c for c in s.constraints if c.label.startswith("constraints.limits")]
    assert [(c.column, c.sense, c.limit) for c in lims] == [
        ("junction_margin_chip_K", ">=", 10.0), ("reynolds_number", "<=", 2300.0)]


# ------------------------------------------------------------------ shipped studies, round trip


@pytest.mark.parametrize("name", ["quickstart.yaml", "overnight.yaml"])
def test_shipped_studies_load_and_round_trip(name):
    path = ROOT / "studies" / name
    s = load_study(path)
    assert s.source_path == str(path)
    again = load_study(s.resolved)
    assert again == dataclasses.replace(s, source_path=None)
    # the frozen study file as written to a run folder
    text = yaml.safe_dump(s.resolved, sort_keys=False)
    assert load_study(text) == again
    assert again.resolved == s.resolved  # resolving is idempotent


def test_shipped_studies_content():
    q = load_study(ROOT / "studies" / "quickstart.yaml")
    assert len(q.scenarios[0].conditions.sources) >= 2
    # the README promises under a minute on two cores: ~1e4 designs take ~10 s end to end
    assert q.budget.population * q.budget.generations <= 10_000
    assert {v.name for v in q.variables} >= {"material", "fan"}
    o = load_study(ROOT / "studies" / "overnight.yaml")
    assert len(o.objectives) == 3 and len(o.fan_names) >= 3
    modes = [sc.conditions.supply.mode for sc in o.scenarios]
    assert "stopped" in modes and modes[0] == "fan"
    assert any(sc.conditions.ambient_pressure_Pa < 80000 for sc in o.scenarios)  # altitude
    assert o.scenarios[0].conditions.clearance_top_m > 0  # an unducted sink with bypass


def test_documented_example_loads():
    text = (ROOT / "docs" / "study-file.md").read_text()
    blocks = re.findall(r"```yaml\n(.*?)```", text, re.S)
    s = load_study(blocks[-1])  # the complete example at the end of the document
    assert [sc.name for sc in s.scenarios] == ["nominal", "hot_day", "fan_stopped"]
