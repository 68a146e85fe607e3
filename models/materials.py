"""Heat-sink materials (conductivity, density) and surface emissivity by finish.

Values are typical room-temperature values for design studies, not guaranteed minima; each
entry names where it comes from. Conductivity of the 6xxx alloys depends on temper (and falls
a few per cent with alloy content within the specification); the extruder's data sheet
decides for a real part.

Emissivities are total hemispherical values near room temperature; for metals they depend
strongly on surface state (polish, oxide, anodic-film thickness), so the table gives one
representative value per finish and its note the usual range.
"""

from __future__ import annotations

from typing import NamedTuple


class Material(NamedTuple):
    """A solid material for fins and base (room-temperature values, SI units)."""

    name: str
    conductivity_W_per_mK: float
    density_kg_per_m3: float
    note: str  # source of the values


_AA = (
    "Aluminum Association typical values (Aluminum Standards and Data), "
    "as quoted on alloy data sheets"
)

MATERIALS: dict[str, Material] = {
    m.name: m
    for m in (
        Material(
            "6063-T5",
            209.0,
            2700.0,
            f"{_AA}: k 209 W/m K at 25 C (121 Btu/ft h F), density 2.70 g/cm3",
        ),
        Material(
            "6063-T6",
            201.0,
            2700.0,
            f"{_AA}: k 116 Btu/ft h F = 201 W/m K at 20 C, density 2.70 g/cm3",
        ),
        Material(
            "6061-T6",
            167.0,
            2700.0,
            f"{_AA}: k 167 W/m K at 25 C, density 2.70 g/cm3",
        ),
        Material(
            "1050A",
            222.0,
            2710.0,
            "EN AW-1050A data sheet (typical): k 222 W/m K at 25 C, density 2.71 g/cm3; "
            "other 1050 data sheets give 225-231 W/m K in the soft (O) temper",
        ),
        Material(
            "C11000",
            388.0,
            8890.0,
            "ETP copper (Cu-ETP, CW004A): k 388 W/m K at 20 C, ASM Metals Handbook value, "
            "recalled from memory (data sheets give 385-394 W/m K); density 8.89 g/cm3 is "
            "the IEC standard value for copper (1913)",
        ),
    )
}


def material(name: str) -> Material:
    """The Material record (conductivity W/(m K), density kg/m3, note) for a material name.

    Formula: table look-up in :data:`MATERIALS`; exact name first, then case-insensitive.

    Parameters: name -- material name, e.g. '6063-T5' (no unit).
    Returns: Material(name, conductivity_W_per_mK, density_kg_per_m3, note).
    Validity: room temperature (20-25 C); conductivity of aluminium alloys rises about 5 %
    from 25 C to 100 C, which the table ignores. An unknown name raises KeyError whose
    message names the bad value and lists the known names (this is configuration, not the
    vectorized hot path).
    Source: per entry, in its ``note`` (Aluminum Association typical values; EN 1050A data
    sheet; ASM Metals Handbook for C11000, recalled from memory).

    Example: 6063-T5 -> 209 W/(m K), 2700 kg/m3 (Aluminum Association typical).

    >>> material("6063-t5").conductivity_W_per_mK
    209.0
    """
    if name in MATERIALS:
        return MATERIALS[name]
    folded = {k.casefold(): v for k, v in MATERIALS.items()}
    key = str(name).casefold()
    if key in folded:
        return folded[key]
    raise KeyError(
        f"material: unknown name {name!r}; expected one of: {', '.join(sorted(MATERIALS))}"
    )


_FINISH_NOTE = "common practice, no source"

# finish -> (emissivity, note with the usual range and where the range comes from)
_EMISSIVITY_TABLE: dict[str, tuple[float, str]] = {
    "bare_aluminium": (
        0.09,
        "mill-finish / commercial-sheet aluminium; range 0.04 (polished) to 0.1; emissivity "
        "tables list commercial sheet 0.09 and polished plate 0.04-0.06",
    ),
    "oxidised_aluminium": (
        0.25,
        "weathered / heavily oxidised aluminium; tables list 0.20-0.33",
    ),
    "clear_anodised": (
        0.80,
        f"{_FINISH_NOTE}: 0.7-0.9 depending on anodic-film thickness "
        "(Incropera & DeWitt, Table A.11, anodized aluminium 0.82 -- recalled from memory)",
    ),
    "black_anodised": (
        0.85,
        f"{_FINISH_NOTE}: 0.80-0.90 for dyed black anodic films",
    ),
    "painted": (
        0.90,
        "non-metallic paint or powder coat of any colour; tables list lacquers and paints 0.8-0.98",
    ),
    "polished_copper": (
        0.03,
        "polished copper; tables list 0.02-0.05",
    ),
    "oxidised_copper": (
        0.70,
        "oxidised copper; tables list 0.6-0.78 (black oxide up to 0.88)",
    ),
}

EMISSIVITY: dict[str, float] = {k: v[0] for k, v in _EMISSIVITY_TABLE.items()}
EMISSIVITY_NOTES: dict[str, str] = {k: v[1] for k, v in _EMISSIVITY_TABLE.items()}


def emissivity(finish: str) -> float:
    """Total hemispherical emissivity (0-1) of a surface finish at room temperature.

    Formula: table look-up in :data:`EMISSIVITY`; exact key first, then case-insensitive
    with spaces and hyphens read as underscores.

    Parameters: finish -- finish name, e.g. 'black_anodised' (no unit).
    Returns: emissivity, - (0.03 to 0.90 in this table).
    Validity: near room temperature, infrared (total) emissivity. Metal values depend on the
    surface state; the range is in :data:`EMISSIVITY_NOTES`. An unknown finish raises
    KeyError naming the bad value and listing the known finishes.
    Source: common practice, no source, for the anodised finishes; ranges for bare and
    oxidised metals and paints as in the usual total-emissivity tables (see the notes).

    Example: black anodised -> 0.85 (common practice: 0.80-0.90).

    >>> emissivity("Black anodised")
    0.85
    """
    if finish in EMISSIVITY:
        return EMISSIVITY[finish]
    key = str(finish).strip().casefold().replace(" ", "_").replace("-", "_")
    if key in EMISSIVITY:
        return EMISSIVITY[key]
    raise KeyError(
        f"emissivity: unknown finish {finish!r}; expected one of: {', '.join(sorted(EMISSIVITY))}"
    )
