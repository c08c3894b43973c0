"""Relative permittivities of overlays and board materials, with their origin.

Values are for the touch-sensing band (about 10 kHz to a few MHz) and are
nominal picks inside the ranges the sources give; each entry says where its
range comes from. Real parts vary with grade, moisture and temperature, so a
measured value from the supplier's data sheet always wins (give it as
``--overlay 2:3.1``).
"""

from __future__ import annotations

from dataclasses import dataclass

from auditor.errors import UsageError


@dataclass(frozen=True)
class Material:
    """One entry of the table."""

    name: str
    er: float
    er_range: tuple[float, float]
    origin: str


_COMPILATION = "plastics compilation table, 50 Hz / 1 MHz columns (no single handbook)"

MATERIALS: dict[str, Material] = {m.name: m for m in (
    Material("air", 1.0, (1.0, 1.0006),
             "pub, from memory: CRC Handbook of Chemistry and Physics (1.000585)"),
    Material("acrylic", 2.8, (2.6, 3.9),
             f"{_COMPILATION}; Riddle, Baker-Jarvis & Krupka, IEEE MTT 51 (2003) 727"),
    Material("pmma", 2.8, (2.6, 3.9),
             f"{_COMPILATION}; Riddle, Baker-Jarvis & Krupka, IEEE MTT 51 (2003) 727"),
    Material("polycarbonate", 2.9, (2.9, 3.2),
             f"{_COMPILATION}; 2.76 at 11 GHz in Riddle et al. 2003"),
    Material("abs", 3.0, (2.4, 3.8), _COMPILATION),
    Material("pet", 3.2, (3.0, 4.0), f"{_COMPILATION}; from memory 3.2-3.3 at 1 kHz"),
    Material("polyimide", 3.4, (3.4, 3.5), _COMPILATION),
    Material("silicone", 3.6, (2.9, 4.0), _COMPILATION),
    Material("polyethylene", 2.3, (2.3, 2.3), _COMPILATION),
    Material("polypropylene", 2.2, (2.2, 2.3), _COMPILATION),
    Material("ptfe", 2.1, (2.1, 2.1), _COMPILATION),
    Material("polystyrene", 2.5, (2.5, 2.5), _COMPILATION),
    Material("nylon", 3.6, (3.4, 3.8), f"{_COMPILATION} (dry; more when wet)"),
    Material("glass", 7.0, (6.5, 7.6),
             "soda-lime glass; from memory, von Hippel, Dielectric Materials and "
             "Applications, 1954"),
    Material("soda-lime-glass", 7.0, (6.5, 7.6),
             "from memory, von Hippel, Dielectric Materials and Applications, 1954"),
    Material("borosilicate-glass", 4.6, (4.0, 5.0), "compilations 4.0-5.0; from memory 4.6"),
    Material("aluminosilicate-glass", 7.5, (7.0, 8.0),
             "chemically strengthened cover glass; from memory"),
    Material("fused-silica", 3.8, (3.75, 3.8), "from memory, CRC Handbook"),
    Material("fr4", 4.4, (4.2, 4.8),
             "from memory; compilations 4.3-5.0, IPC-4101 caps Dk at 5.4 (1 MHz)"),
    Material("solder-mask", 3.6, (3.3, 4.0), "common practice, no source"),
    Material("adhesive", 3.5, (3.0, 4.5),
             "acrylic pressure-sensitive / optically clear adhesive; from memory"),
    Material("wood-dry", 3.0, (2.0, 5.0),
             "pub, from memory: USDA FPL Wood Handbook (FPL-GTR-190, 2010) ch. 5"),
)}


def material(name: str) -> Material:
    """Look a material up by name (case-insensitive).

    Raises
    ------
    UsageError
        When the name is unknown; the message lists the valid names.

    Examples
    --------
    >>> material("Acrylic").er
    2.8
    """
    key = name.strip().lower()
    if key not in MATERIALS:
        raise UsageError(f"unknown material {name!r}; known materials: "
                         f"{', '.join(sorted(MATERIALS))}")
    return MATERIALS[key]
