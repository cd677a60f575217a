"""Conductor and soil property tables (SI units).

Conductors: resistivity at 20 °C [ohm m], relative permeability used for skin
effect, and for copper-clad steel the cladding fraction of the area.

Soils: ground constants (relative permittivity, conductivity [S/m]) with a
plausible range for each, used for the uncertainty bounds. Sea, fresh water,
wet, medium dry and very dry are ITU-R P.527 categories; "intermediate"
(εr 22, σ 3 mS/m) and "dry" (εr 7, σ 0.3 mS/m) are not P.527 categories but
the parameters of the ITU-R P.368 ground-wave curves "land" and "dry ground".

References
----------
IEC 60028, International standard of resistance for copper (annealed copper,
1.72414e-8 ohm m at 20 °C, 100 % IACS).
ITU-R P.527, Electrical characteristics of the surface of the Earth (ground
categories at LF/MF).
ITU-R P.368, Ground-wave propagation curves for frequencies between 10 kHz and
30 MHz (the curve parameters "land" and "dry ground").
IEEE Std 142 (Green Book) / IEEE Std 80, typical soil resistivities.
"""

from __future__ import annotations

from aerial.core.records import NamedTuple


class Conductor(NamedTuple):
    """A wire metal: resistivity at 20 °C [ohm m], relative permeability [1] and, for copper-clad steel, its core."""

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


class Soil(NamedTuple):
    """A ground category: relative permittivity [1] and conductivity [S/m], with the bounds of its range."""

    name: str
    relative_permittivity: float
    conductivity_s_m: float
    conductivity_low_s_m: float
    conductivity_high_s_m: float
    description: str
    source: str = "ITU-R P.527 category"
    relative_permittivity_low: float | None = None
    relative_permittivity_high: float | None = None


# ITU-R P.527 categories and two ITU-R P.368 curve parameters at LF/MF (centre values); the low/high bounds span the
# neighbouring categories and are used for the uncertainty range. The permittivity bounds of the land categories are
# the permittivities of the same neighbours (the drier neighbour's for the low bound, the wetter's for the high; wet
# ground, the wettest land category, keeps its own 30 as the high bound, very dry ground its own 3 as the low).
# Sea: average salinity (eps_r 70) to low salinity (P.527 "sea water, low salinity": eps_r 80, from memory). Fresh
# water: 78-88, the permittivity of water between 25 and 0 degC (CRC Handbook of Chemistry and Physics, from memory).
SOILS: dict[str, Soil] = {
    "sea": Soil("sea", 70.0, 5.0, 3.0, 6.0, "sea water, average salinity",
                relative_permittivity_low=70.0, relative_permittivity_high=80.0),
    "fresh-water": Soil("fresh-water", 80.0, 3e-3, 1e-3, 1e-2, "fresh water (lake, river)",
                        relative_permittivity_low=78.0, relative_permittivity_high=88.0),
    "wet": Soil("wet", 30.0, 1e-2, 3e-3, 3e-2, "wet ground, marsh, rich farmland",
                relative_permittivity_low=22.0, relative_permittivity_high=30.0),
    "intermediate": Soil("intermediate", 22.0, 3e-3, 1e-3, 1e-2, "land between wet and medium dry",
                         "ITU-R P.368 curve 'land'", relative_permittivity_low=15.0, relative_permittivity_high=30.0),
    "medium-dry": Soil("medium-dry", 15.0, 1e-3, 3e-4, 3e-3, "medium dry ground, typical suburban lot",
                       relative_permittivity_low=7.0, relative_permittivity_high=22.0),
    "dry": Soil("dry", 7.0, 3e-4, 1e-4, 1e-3, "dry ground, sandy or stony",
                "ITU-R P.368 curve 'dry ground'", relative_permittivity_low=3.0, relative_permittivity_high=15.0),
    "very-dry": Soil("very-dry", 3.0, 1e-4, 3e-5, 3e-4, "very dry ground, desert, rock",
                     relative_permittivity_low=3.0, relative_permittivity_high=7.0),
}


#: Soil in a homeowner's words, mapped to the category above whose conductivity lies nearest (on a
#: log scale) to the typical resistivity of that ground. Typical resistivities from BS 7430 (Code of
#: practice for protective earthing), table of soil resistivities (from memory): marshy ground
#: 2-2.7 ohm m, loam and clay 4-150 ohm m, chalk 60-400 ohm m, sand 90-8000 ohm m, peat 200 ohm m and
#: upwards, rock 1000 ohm m and upwards. Where a range spans two categories the drier is taken, so a
#: word never promises a better earth than the ground gives.
SOIL_WORDS: dict[str, tuple[str, str]] = {
    "marsh": ("wet", "marshy ground, 2–2.7 Ω·m"),
    "clay": ("wet", "loam and clay, 4–150 Ω·m"),
    "loam": ("wet", "loam and clay, 4–150 Ω·m"),
    "chalk": ("intermediate", "chalk, 60–400 Ω·m"),
    "peat": ("intermediate", "peat, 200 Ω·m and upwards"),
    "sand": ("dry", "sand, 90–8000 Ω·m"),
    "rock": ("very-dry", "rock, 1000 Ω·m and upwards"),
}
#: Other spellings of the same words.
SOIL_WORD_ALIASES: dict[str, str] = {
    "marshy": "marsh", "marshland": "marsh", "bog": "marsh", "boggy": "marsh", "swamp": "marsh", "swampy": "marsh", "fen": "marsh",
    "clay soil": "clay", "clayey": "clay", "loamy": "loam", "garden soil": "loam", "topsoil": "loam",
    "chalky": "chalk", "peaty": "peat", "sandy": "sand", "sand and gravel": "sand",
    "gravel": "sand", "stony": "sand", "rocky": "rock", "granite": "rock",
}


#: How good the ground is, in the words people use for it ("average ground"), mapped to the category
#: whose description fits: common practice, not a published table. The note names the category's
#: conductivity so the reader sees what was assumed.
GROUND_QUALITY_WORDS: dict[str, str] = {
    "very good": "wet", "good": "wet", "average": "intermediate", "typical": "intermediate", "fair": "medium-dry",
    "poor": "dry", "very poor": "very-dry",
}


def soil_category(written: str) -> tuple[str, str] | None:
    """The category for a soil name or a homeowner's word, with a note when a word was mapped.

    Returns ``(category, note)`` (``note`` empty for a category name), or None when unknown.

    >>> soil_category("Clay")[0]
    'wet'
    >>> soil_category("medium dry")
    ('medium-dry', '')
    >>> soil_category("average ground")[0]
    'intermediate'

    """
    norm = " ".join(str(written).strip().lower().replace("_", " ").replace("-", " ").split())
    if norm.replace(" ", "-") in SOILS:
        return norm.replace(" ", "-"), ""
    quality = norm.removesuffix(" ground").removesuffix(" soil")
    if quality in GROUND_QUALITY_WORDS:
        category = GROUND_QUALITY_WORDS[quality]
        soil = SOILS[category]
        return category, (f'soil "{str(written).strip()}" is read as the category "{category}" ({soil.description}, '
                          f'{soil.conductivity_s_m * 1e3:g} mS/m); give [soil] conductivity or resistivity if it '
                          'has been measured')
    word = SOIL_WORD_ALIASES.get(norm, norm)
    if word not in SOIL_WORDS:
        return None
    category, why = SOIL_WORDS[word]
    return category, (f'soil "{str(written).strip()}" is read as the category "{category}" (typical resistivity of '
                      f'{why}, BS 7430); give [soil] conductivity or resistivity if it has been measured')
