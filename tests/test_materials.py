"""Material and surface-finish tables (models/materials.py): look-ups, errors, plausible values."""

from __future__ import annotations

import doctest

import pytest

import models.materials as materials_module
from models.materials import EMISSIVITY, EMISSIVITY_NOTES, MATERIALS, Material, emissivity, material

_NAMES = {"6063-T5", "6063-T6", "6061-T6", "1050A", "C11000"}


def test_table_holds_the_five_materials():
    assert set(MATERIALS) == _NAMES
    for name, m in MATERIALS.items():
        assert isinstance(m, Material) and m.name == name and m.note


def test_lookup_exact_and_case_insensitive():
    assert material("6063-T5") is MATERIALS["6063-T5"]
    assert material("c11000") is MATERIALS["C11000"]
    assert material("1050a").density_kg_per_m3 == MATERIALS["1050A"].density_kg_per_m3


def test_unknown_material_message_names_value_and_lists_names():
    with pytest.raises(KeyError) as err:
        material("6082-T6")
    msg = str(err.value)
    assert "6082-T6" in msg
    for name in _NAMES:
        assert name in msg
    assert "\n" not in msg  # one clear line


# Independent second source for the ranges: Nippon Light Metal, "Basic data on aluminium"
# (physical properties of aluminium alloys, thermal conductivity at 20 C in kW/(m C), printed
# to 2 digits: 6063-T5 0.21, 6063-T6 0.20, 6061-T6 0.17, 1050-O 0.23; densities 6063 2.69,
# 6061 2.7, 1050 2.7 Mg/m3). Copper: Copper Development Association, "Introduction to Copper:
# Fact Sheets", Table 5: k 3.94 W cm/(cm2 C) at 20 C, density 8.89 (IEC) / 8.92 g/cm3 typical.
_NLM = "Nippon Light Metal, Basic Data on Aluminium, alloy table (20 C)"
_CDA = "Copper Development Association, Introduction to Copper, Table 5 (20 C)"


@pytest.mark.parametrize(
    ("name", "k_ref", "k_tol", "rho_ref", "rho_tol", "source"),
    [
        # 2-digit table: +-5 W/m K from rounding; 1050A vs the 1050-O row: a further 3 %
        # for temper and the EN variant, hence 10 W/m K
        ("6063-T5", 210.0, 5.0, 2690.0, 15.0, _NLM),
        ("6063-T6", 200.0, 5.0, 2690.0, 15.0, _NLM),
        ("6061-T6", 170.0, 5.0, 2700.0, 15.0, _NLM),
        ("1050A", 230.0, 10.0, 2700.0, 15.0, _NLM),
        # pure annealed copper vs ETP C11000 (oxygen-bearing): up to 2 % lower k
        ("C11000", 394.0, 8.0, 8920.0, 40.0, _CDA),
    ],
)
def test_material_values_within_published_ranges(check, name, k_ref, k_tol, rho_ref, rho_tol,
                                                  source):
    m = material(name)
    check(f"{name} thermal conductivity", m.conductivity_W_per_mK, k_ref, source, atol=k_tol)
    # densities printed to 3 digits (+-5 kg/m3) and differing by alloy within the standard
    check(f"{name} density", m.density_kg_per_m3, rho_ref, source, atol=rho_tol)


def test_emissivity_lookup_and_normalisation():
    assert emissivity("black_anodised") == EMISSIVITY["black_anodised"]
    assert emissivity("Black anodised") == EMISSIVITY["black_anodised"]
    assert emissivity("clear-anodised") == EMISSIVITY["clear_anodised"]
    assert set(EMISSIVITY) == set(EMISSIVITY_NOTES)
    for value in EMISSIVITY.values():
        assert 0.0 < value <= 1.0


def test_unknown_finish_message_lists_finishes():
    with pytest.raises(KeyError) as err:
        emissivity("chromate")
    msg = str(err.value)
    assert "chromate" in msg
    for finish in EMISSIVITY:
        assert finish in msg


_TABLES = "total-emissivity tables (Omega OS100 manual Sec. 6; FLIR camera manual Table 39.1)"
_NO_SOURCE = "common practice, no source"


@pytest.mark.parametrize(
    ("finish", "low", "high", "source"),
    [
        # polished plate 0.04-0.06 ... commercial sheet 0.09
        ("bare_aluminium", 0.04, 0.10, _TABLES),
        ("oxidised_aluminium", 0.20, 0.33, _TABLES),  # heavily oxidised 0.20-0.31 / 0.2-0.33
        ("clear_anodised", 0.70, 0.90, _NO_SOURCE),  # Incropera Table A.11: 0.82 (recalled)
        ("black_anodised", 0.80, 0.90, _NO_SOURCE),
        ("painted", 0.80, 0.98, _TABLES),  # lacquers and paints, 40-100 C
        ("polished_copper", 0.02, 0.05, _TABLES),
        ("oxidised_copper", 0.60, 0.78, _TABLES),  # oxidised 0.6-0.7, heavily oxidised 0.78
    ],
)
def test_emissivity_within_published_ranges(check, finish, low, high, source):
    # tolerance: the published range itself (a finish's emissivity varies that much)
    check(f"emissivity of {finish}", emissivity(finish), 0.5 * (low + high), source,
          atol=0.5 * (high - low))


def test_docstring_examples():
    result = doctest.testmod(materials_module, verbose=False)
    assert result.attempted >= 2 and result.failed == 0
