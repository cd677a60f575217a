"""Conductor and soil property tables (SI units).

Conductors: resistivity at 20 °C [ohm m], relative permeability used for skin
effect, and for copper-clad steel the cladding fraction of the area.

Soils: the ground categories of ITU-R P.527 (relative permittivity, conductivity
[S/m]) with a plausible range for each, used for the uncertainty bounds.

References
----------
IEC 60028, International standard of resistance for copper (annealed copper,
1.72414e-8 ohm m at 20 °C, 100 % IACS).
ITU-R P.527, Electrical characteristics of the surface of the Earth (ground
categories at LF/MF).
IEEE Std 142 (Green Book) / IEEE Std 80, typical soil resistivities.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Conductor:
    name: str
    resistivity_ohm_m: float  # at 20 °C
    relative_permeability: float
    note: str = ""
    cladding_area_fraction: float = 0.0  # copper-clad steel only
    core_resistivity_ohm_m: float = 0.0
    core_relative_permeability: float = 1.0


# IEC 60028 annealed copper; aluminium 61 % IACS (EC grade, handbook value, from memory);
# galvanised steel wire: resistivity ~1.4e-7 ohm m and a relative permeability of order 100
# at radio frequencies are typical handbook values (from memory) and are uncertain.
CONDUCTORS: dict[str, Conductor] = {
    "copper": Conductor("copper", 1.72414e-8, 1.0, "annealed copper, 100 % IACS (IEC 60028)"),
    "aluminium": Conductor("aluminium", 2.8264e-8, 1.0, "EC-grade aluminium, 61 % IACS"),
    "steel": Conductor("steel", 1.4e-7, 100.0, "galvanised steel; permeability is uncertain"),
    "copper-clad steel": Conductor(
        "copper-clad steel",
        1.72414e-8,
        1.0,
        "copper cladding over a steel core (30 % IACS grade)",
        cladding_area_fraction=0.24,
        core_resistivity_ohm_m=1.4e-7,
        core_relative_permeability=100.0,
    ),
}

CONDUCTOR_ALIASES = {
    "aluminum": "aluminium",
    "ccs": "copper-clad steel",
    "copper clad steel": "copper-clad steel",
    "copperweld": None,  # a brand name: not accepted as a material word
}


@dataclass(frozen=True)
class Soil:
    name: str
    relative_permittivity: float
    conductivity_s_m: float
    conductivity_low_s_m: float
    conductivity_high_s_m: float
    description: str


# ITU-R P.527 categories at LF/MF (centre values); the low/high bounds span the
# neighbouring categories and are used for the uncertainty range.
SOILS: dict[str, Soil] = {
    "sea": Soil("sea", 70.0, 5.0, 3.0, 6.0, "sea water, average salinity"),
    "fresh-water": Soil("fresh-water", 80.0, 3e-3, 1e-3, 1e-2, "fresh water (lake, river)"),
    "wet": Soil("wet", 30.0, 1e-2, 3e-3, 3e-2, "wet ground, marsh, rich farmland"),
    "intermediate": Soil("intermediate", 22.0, 3e-3, 1e-3, 1e-2, "land between wet and medium dry"),
    "medium-dry": Soil("medium-dry", 15.0, 1e-3, 3e-4, 3e-3, "medium dry ground, typical suburban lot"),
    "dry": Soil("dry", 7.0, 3e-4, 1e-4, 1e-3, "dry ground, sandy or stony"),
    "very-dry": Soil("very-dry", 3.0, 1e-4, 3e-5, 3e-4, "very dry ground, desert, rock"),
}
