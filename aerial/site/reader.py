"""Read and validate a site file (TOML) into a :class:`Site`.

The file speaks the user's language: supports with plan positions and heights,
spans between them, explicit wire runs as 3-D polylines, the lead-in to the
receiver, the earth system, the soil, the bands and the stations. Cutting the
wires into segments is :mod:`aerial.geometry.resolve`'s job.

Every rejection raises :class:`aerial.core.errors.SiteError` naming the file, the key
(with the line where it can be found), the value and what is expected. The
file is only ever read.

Frame: metres, x east, y north, z up; z = 0 is the ground surface.
"""

from __future__ import annotations

import math
import os
import re
import tomllib

import numpy as np

from aerial.core import units
from aerial.core.errors import SiteError
from aerial.core.lengthtext import metres, words
from aerial.core.materials import CONDUCTOR_ALIASES, CONDUCTORS, SOIL_WORDS, SOILS, Soil, soil_category
from aerial.core.records import NamedTuple
from aerial.models.winding import CoilWinding
from aerial.site.building import SiteBuilding, parse_building
from aerial.site.plan import Plan, parse_plan
from aerial.site.tables import (  # noqa: F401  (TableReader and the words are read from here too)
    HEIGHT_TOLERANCE_M, MAX_SITE_LENGTH_M, SUPPORT_KINDS, TableReader, choice_words, shown_key, unknown_key_words,
)

BUILTIN_NAME = "<built-in example>"
BUILTIN_RESOURCE = "backyard_inverted_l.toml"

#: Largest site file read [bytes]; a larger one is refused before parsing.
MAX_FILE_BYTES = 2_000_000

#: Most straight wire pieces a site may hold (spans count SAG_PIECES each when they sag; the lead-in,
#: earth lead and counterpoise wires count too). The electrostatic solution cuts every piece into
#: about 20 unknowns and solves a dense system several times per report, so this keeps a report
#: to tens of seconds and a few hundred MB on a small machine.
MAX_WIRE_PIECES = 100

#: Most named supports in [supports] (each is a candidate for `aerial layout`, whose search grows with
#: the square of their number, and every span names two).
MAX_SUPPORTS = 200

#: Most entries in site.bands (the named "hf" counts as one entry and holds 14 bands).
MAX_BAND_ENTRIES = 32

#: What people call the broadcast bands, and the band name aerial reads for it (a hint in the message; never read
#: silently: "am" could be any AM band). Common practice.
BAND_EVERYDAY_NAMES = {
    "am": ("mf", "the medium-wave AM broadcast band, 520-1710 kHz"),
    "mw": ("mf", "medium wave, 520-1710 kHz"), "medium wave": ("mf", "medium wave, 520-1710 kHz"),
    "lw": ("lf", "long wave, 148.5-283.5 kHz"), "long wave": ("lf", "long wave, 148.5-283.5 kHz"),
    "longwave": ("lf", "long wave, 148.5-283.5 kHz"), "mediumwave": ("mf", "medium wave, 520-1710 kHz"),
    "sw": ("hf", "the short-wave broadcast bands"), "short wave": ("hf", "the short-wave broadcast bands"),
    "shortwave": ("hf", "the short-wave broadcast bands"),
}
#: Most sweep frequencies a report computes (all bands together). The worst named set, "lf", "mf" and
#: "hf" at the finest step of 100 Hz, gives 51,616; the closed-form report on it takes about 4 s and
#: writes 21 MB of JSON on the reference machine (benchmarks/bench_limits.py).
MAX_FREQUENCIES = 60_000

#: Points a band is swept at, at most (band edges included).
MAX_POINTS_PER_BAND = 5001

#: Most stations a site may list: every 9 kHz broadcast channel of the LF (15) and MF (120) bands
#: fits. Each station's verdict weighs every other listed station (interference), so the work grows
#: with the square of the count; at this limit the worst legal file takes a few seconds.
MAX_STATIONS = 150

#: Largest distance to a station (half the Earth's circumference). [m]
MAX_STATION_DISTANCE_M = 20_000e3

#: Nearest station accepted (the ground-wave field is a far-field model). [m]
MIN_STATION_DISTANCE_M = 100.0

#: A lead-in start written this close above or below the aerial wire (a round height under a sagging span) starts
#: on the wire, with a note; farther off it is refused with the wire's height there. [m]
LEAD_IN_SNAP_M = 0.15

#: Transmitter powers accepted (the largest broadcast transmitters are about 2 MW). [W]
STATION_POWER_W = (1e-3, 10e6)

#: A station below this power is read as written but noted: a broadcaster's is 100 W or more. [W]
QUIET_STATION_POWER_W = 1.0

#: Reference field strengths accepted for site.field_strength. [V/m]
FIELD_STRENGTH_V_PER_M = (1e-7, 10.0)

#: Coil and primary inductances accepted. [H]
INDUCTANCE_RANGE_H = (10e-9, 1.0)

#: Largest tuning or coupling capacitance accepted. [F]
CAPACITANCE_MAX_F = 1e-6

#: Earphone impedances accepted. [ohm]
EARPHONE_RANGE_OHM = (1.0, 100e6)

#: Thinnest wire accepted (about 50 SWG is 0.025 mm). [m]
MIN_WIRE_DIAMETER_M = 0.01e-3

#: Lowest height above ground a support or a wire point may have (0 is allowed only where it means "at
#: ground level": the receiver, a lead's end); anything lower is a slip of the number or its unit. [m]
MIN_HEIGHT_M = 0.01

#: Points closer than this are the same point (wires joined there). [m]
JOIN_TOLERANCE_M = 0.01

#: A straight piece of wire must be at least this many radii long (thin-wire models).
MIN_LENGTH_TO_RADIUS = 10.0

#: A receiver below this height is fed at ground level (no earth-lead wire is modelled). [m]
EARTH_LEAD_MIN_HEIGHT_M = 0.05

#: Shortest rod, buried wire or buried pipe the electrode formulas are used for. [m]
MIN_ELECTRODE_LENGTH_M = 0.3

#: Plain-number pieces a sagging span is cut into.
SAG_PIECES = 8

#: Audio-frequency impedance taken for a "high-impedance" earphone (a 2000-ohm-DC magnetic headset is
#: roughly 10 kohm at 1 kHz; a crystal earphone with its load resistor is higher): an assumption. [ohm]
HIGH_IMPEDANCE_EARPHONE_OHM = 10_000.0
#: A "low-impedance" headphone. [ohm]
LOW_IMPEDANCE_EARPHONE_OHM = 32.0

NOISE_CATEGORIES = ("city", "residential", "rural", "quiet-rural")
#: Other words for the man-made noise categories: ITU-R P.372's own name for the noisiest
#: ("business") and the everyday ones ("urban", "suburban").
NOISE_WORDS = {"business": "city", "urban": "city", "suburban": "residential", "quiet": "quiet-rural"}

#: Named bands [Hz]. MF covers every ITU region's broadcast allocation
#: (Regions 1/3: 526.5-1606.5 kHz; Region 2: 525-1705 kHz; ITU Radio Regulations).
NAMED_BANDS: dict[str, list[tuple[str, float, float]]] = {
    "lf": [("LF broadcast", 148.5e3, 283.5e3)],
    "mf": [("MF broadcast", 520e3, 1710e3)],
    "hf": [
        ("HF 120 m", 2.300e6, 2.495e6),
        ("HF 90 m", 3.200e6, 3.400e6),
        ("HF 75 m", 3.900e6, 4.000e6),
        ("HF 60 m", 4.750e6, 5.060e6),
        ("HF 49 m", 5.900e6, 6.200e6),
        ("HF 41 m", 7.200e6, 7.450e6),
        ("HF 31 m", 9.400e6, 9.900e6),
        ("HF 25 m", 11.600e6, 12.100e6),
        ("HF 22 m", 13.570e6, 13.870e6),
        ("HF 19 m", 15.100e6, 15.800e6),
        ("HF 16 m", 17.480e6, 17.900e6),
        ("HF 15 m", 18.900e6, 19.020e6),
        ("HF 13 m", 21.450e6, 21.850e6),
        ("HF 11 m", 25.670e6, 26.100e6),
    ],
}

EARTH_KINDS = ("rods", "buried_wires", "water_pipe", "building_earth", "counterpoise")
COUPLINGS = ("direct", "series capacitor", "coil tap", "separate primary")
DETECTORS = ("germanium", "schottky", "silicon")


# --------------------------------------------------------------------------- data


class WireSize(NamedTuple):
    """A wire's radius [m], its metal and the size as the file gave it (for the report)."""

    radius_m: float
    material: str
    described_as: str


class Support(NamedTuple):
    """A support of ``[supports]``: plan position, height and its uncertainty (one-sided), kind. [m]"""

    name: str
    x_m: float
    y_m: float
    height_m: float
    kind: str
    height_tolerance_m: float


class WireRun(NamedTuple):
    """One resolved wire: a 3-D polyline with its size and role.

    ``role`` is "aerial", "lead-in", "earth lead" or "counterpoise".
    ``supports`` names the supports whose heights set its points, index-aligned with
    ``points_m`` (None where a point is not on a support), for the what-if and
    uncertainty runs.
    """

    name: str
    role: str
    points_m: np.ndarray
    size: WireSize
    key: str
    support_at_point: tuple = ()

    @property
    def length_m(self) -> float:
        return float(np.linalg.norm(np.diff(self.points_m, axis=0), axis=1).sum())


class SoilSpec(NamedTuple):
    """The site's ground: relative permittivity [1] and conductivity [S/m] with the bounds of their range."""

    name: str
    relative_permittivity: float
    conductivity_s_m: float
    conductivity_low_s_m: float
    conductivity_high_s_m: float
    source: str
    relative_permittivity_low: float | None = None
    relative_permittivity_high: float | None = None

    @property
    def permittivity_bounds(self) -> tuple[float, float]:
        """Low and high relative permittivity of the soil's range (the value itself when it was given). [1]"""
        low = self.relative_permittivity if self.relative_permittivity_low is None else self.relative_permittivity_low
        high = self.relative_permittivity if self.relative_permittivity_high is None else self.relative_permittivity_high
        return min(low, self.relative_permittivity), max(high, self.relative_permittivity)


class Electrode(NamedTuple):
    """One part of the earth system, lengths in metres."""

    kind: str  # "rods", "buried_wires", "water_pipe", "building_earth"
    key: str
    count: int = 1
    length_m: float = 0.0
    diameter_m: float = 0.0
    spacing_m: float = 0.0
    depth_m: float = 0.0
    x_m: float | None = None
    y_m: float | None = None
    resistance_ohm: float | None = None
    continuous_metal: bool | None = None
    arrangement: str = ""


class Station(NamedTuple):
    """A station of ``[[stations]]``: frequency [Hz], power [W], distance [m], the ground on the path, bearings."""

    name: str
    frequency_hz: float
    power_w: float
    distance_m: float
    soil: SoilSpec
    key: str
    latitude_deg: float | None = None
    longitude_deg: float | None = None
    bearing_deg: float | None = None
    distance_to_sea_m: float | None = None


class Receiver(NamedTuple):
    """The receiver of ``[receiver]``: where it stands [m] and its tuning parts in SI units (H, F, ohm)."""

    x_m: float
    y_m: float
    height_m: float
    coupling: str = "direct"
    inductance_h: float | None = None
    coil: CoilWinding | None = None
    capacitor_min_f: float | None = None
    capacitor_max_f: float | None = None
    coupling_capacitor_f: float | None = None
    tap_fraction: float | None = None
    primary_inductance_h: float | None = None
    coupling_factor: float | None = None
    detector: str = "germanium"
    earphone_ohm: float = 2000.0
    measured: dict | None = None
    given: bool = False
    detector_tap_fraction: float = 1.0
    interference_margin_db: float | None = None
    coupling_given: bool = False  # whether [receiver] names its coupling (else "direct" by default)
    detector_tap_given: bool = False  # whether [receiver] gives detector_tap (else the top, 1, or a designed one)


class Site(NamedTuple):
    """A validated site: what the user described, resolved to metres and SI units.

    Immutable, as the records inside it are: ``site._replace(...)`` gives a changed copy.
    """

    path: str
    name: str
    text: str
    region: str | None
    noise: str
    soil: SoilSpec
    bands: list
    frequency_step_hz: dict
    supports: dict
    wires: list
    receiver: Receiver
    electrodes: list
    stations: list
    field_strength_v_per_m: float
    plan: dict
    notes: list
    raw: dict
    latitude_deg: float | None = None
    longitude_deg: float | None = None
    season: str | None = None
    atmospheric_noise_db: float | None = None
    sunspot_number: float | None = None
    listening_time: str | None = None
    listening_hour: float | None = None
    date_iso: str | None = None
    day_of_year: int | None = None
    utc_offset_h: float | None = None
    distance_to_sea_m: float | None = None
    sea_bearing_deg: float | None = None
    #: The building the wire hangs on: ``[building]``, else the block of flats of ``[plan]``, else inferred
    #: from balcony-rail, window or roof supports (see :func:`aerial.site.building.parse_building`).
    building: SiteBuilding | None = None
    #: Whether ``[plan]`` says the wire is at a flat (``building = "apartment"``).
    apartment: bool = False
    #: ``[plan]`` validated once when the site loads (``plan`` keeps the table as written); read it through
    #: :func:`aerial.site.plan.site_plan`.
    parsed_plan: Plan | None = None

    @property
    def feed_m(self) -> np.ndarray:
        return np.array([self.receiver.x_m, self.receiver.y_m, self.receiver.height_m])


# --------------------------------------------------------------------------- reading


# --------------------------------------------------------------------------- loaders


def load_site(path) -> Site:
    """Read, parse and validate a site file.

    Parameters
    ----------
    path : str or Path or None
        The site file; None loads the built-in example.

    Raises
    ------
    SiteError
        With the file, key, value and what is expected.
    """
    if path is None:
        return builtin_example()
    shown = str(path)
    if not shown.strip():
        raise SiteError('""', "", "", "the site file name is empty; expected the path of a site file (.toml)")
    p = _path_form(os.fspath(path))  # os, not pathlib: a report never needs pathlib's own imports
    _check_path(p, shown)
    if os.path.isdir(p):
        raise SiteError(shown, "", "", "is a folder; expected a site file (.toml)")
    if not os.path.isfile(p):  # a named pipe or a device would block or never end
        raise SiteError(shown, "", "", "is not a regular file; expected a site file (.toml)")
    try:
        size = os.stat(p).st_size
        if size > MAX_FILE_BYTES:
            raise SiteError(shown, "", "", f"is {size / 1e6:.1f} MB; a site file is at most {MAX_FILE_BYTES / 1e6:.0f} MB")
        with open(p, "rb") as f:
            data = f.read()
    except PermissionError:
        raise SiteError(shown, "", "", "cannot be read (permission denied)") from None
    except OSError as err:
        raise SiteError(shown, "", "", f"cannot be read ({err.strerror or err})") from None
    if data.startswith(b"\xef\xbb\xbf"):  # a UTF-8 byte-order mark, as some editors save: not part of the text
        data = data[3:]
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as err:
        raise SiteError(shown, "", "", f"is not UTF-8 text (byte {err.start}); save it as UTF-8") from None
    return load_site_text(text, shown)


def _check_path(p: str, shown: str) -> None:
    """Refuse a path that cannot be opened, saying why (a loop of links is not a missing file)."""
    try:
        os.stat(p)
    except OSError as err:
        import errno  # only for a path that cannot be opened

        why = {
            errno.ENOENT: "no such file",
            errno.ELOOP: "the path is a loop of symbolic links",
            errno.ENAMETOOLONG: "the name is too long for the file system",
            errno.ENOTDIR: "a part of the path is a file, not a folder",
            errno.EACCES: "cannot be read (permission denied)",
        }.get(err.errno, f"cannot be read ({err.strerror or err})")
        if err.errno == errno.ENOENT and os.path.islink(p):
            why = "a symbolic link to a file that does not exist"
        raise SiteError(shown, "", "", why) from None
    except ValueError:  # a NUL character in the name
        raise SiteError(shown, "", "", "not a usable file name") from None


def _path_parts(path: str) -> tuple[str, list]:
    """The root ("", "/" or "//") and the names of a POSIX path, as ``pathlib`` splits it.

    Repeated slashes, a trailing slash and "." parts count for nothing; ".." is kept.
    """
    root = "//" if path.startswith("//") and not path.startswith("///") else "/" if path.startswith("/") else ""
    return root, [x for x in path.split("/") if x and x != "."]


def _path_form(path: str) -> str:
    """``path`` as ``str(pathlib.Path(path))`` writes it: the name the file is opened by."""
    if os.name != "posix":  # pragma: no cover - the other flavour's rules are pathlib's to know
        from pathlib import Path

        return str(Path(path))
    root, names = _path_parts(path)
    return root + "/".join(names) or "."


def _stem(path: str) -> str:
    """The file name without its last suffix, as ``pathlib.Path(path).stem`` gives it ("a/b.c.toml": "b.c")."""
    if os.name != "posix":  # pragma: no cover
        from pathlib import Path

        return Path(path).stem
    names = _path_parts(path)[1]
    name = names[-1] if names else ""
    i = name.rfind(".")
    return name[:i] if 0 < i < len(name) - 1 else name


def _long_number_line(text: str):
    """The line of the first run of 1000 or more digits in ``text`` (None if there is none)."""
    m = re.search(r"\d{1000,}", text)
    return text.count("\n", 0, m.start()) + 1 if m else None


def builtin_example() -> Site:
    """The built-in example site (a backyard inverted-L)."""
    from importlib import resources  # here: it loads tempfile and the package readers, which a site file never needs

    text = resources.files("aerial").joinpath("data", BUILTIN_RESOURCE).read_text(encoding="utf-8")
    return load_site_text(text, BUILTIN_NAME)


def load_site_text(text: str, path: str = "<text>") -> Site:
    """Parse and validate site-file text; ``path`` is used in messages."""
    try:
        raw = tomllib.loads(text)
    except RecursionError:
        raise SiteError(path, "", "", "not valid TOML for aerial: arrays or tables nested too deeply") from None
    except ValueError as err:
        if not isinstance(err, tomllib.TOMLDecodeError):  # an integer past Python's digit limit
            raise SiteError(path, "", "", "a number with thousands of digits: no quantity in a site is written so; "
                            "check the file", line=_long_number_line(text)) from None
        msg = str(err)
        line = None

        m = re.search(r"line (\d+)", msg)
        if m:
            line = int(m.group(1))
        raise SiteError(path, "", "", f"not valid TOML ({msg})", line=line) from None
    r = TableReader(path, text)
    site = _build(r, raw, text, path)
    plan = parse_plan(site)
    site = site._replace(parsed_plan=plan)
    return site._replace(building=parse_building(site, plan), apartment=plan.building == "apartment")


TOP_KEYS = {
    "site", "soil", "wire", "supports", "spans", "runs", "lead_in", "receiver", "earth", "stations", "plan", "building",
}


def _build(r: TableReader, raw: dict, text: str, path: str) -> Site:
    r.check_keys(raw, "", TOP_KEYS)
    site_t = r.table(raw, "", "site")
    r.check_keys(site_t, "site", {"name", "notes", "region", "noise", "bands", "frequency_step", "field_strength", "soil",
                                  "latitude", "longitude", "season", "atmospheric_noise", "sunspots",
                                  "listening_time", "date", "utc_offset", "distance_to_sea", "sea_bearing"})
    name = r.string(site_t, "site", "name", default=_stem(path) if not path.startswith("<") else "example site")
    region = r.string(site_t, "site", "region")
    noise = r.string(site_t, "site", "noise", default="residential", choices=NOISE_CATEGORIES, synonyms=NOISE_WORDS)
    bands = _bands(r, site_t)
    steps = _steps(r, site_t)
    if steps:
        try:
            check_sweep_size(bands, steps["all"], "site.frequency_step")
        except ValueError as err:
            r.fail("site.frequency_step", site_t["frequency_step"], str(err).split(": ", 1)[1])
    field_strength = r.quantity(
        site_t, "site", "field_strength", units.FIELD_STRENGTH_UNITS,
        "a field strength", "V/m", default=1e-3,
    )
    if not FIELD_STRENGTH_V_PER_M[0] <= field_strength <= FIELD_STRENGTH_V_PER_M[1]:
        r.fail("site.field_strength", site_t["field_strength"], "expected a field strength from 0.1 uV/m to 10 V/m")
    if "soil" in site_t and "soil" in raw:
        r.fail("site.soil", site_t["soil"], "the soil is given twice (also as [soil]); keep one")
    soil_notes: list[str] = []
    soil = _soil(r, raw.get("soil", site_t.get("soil", "medium-dry")), "soil" if "soil" in raw else "site.soil",
                 soil_notes)
    wire_t = r.table(raw, "", "wire")
    r.check_keys(wire_t, "wire", _SIZE_KEYS)
    default_size = wire_size(r, wire_t, "wire", None)
    supports = _supports(r, raw)
    _check_table_count(r, raw)
    wires: list[WireRun] = []
    wires += _spans(r, raw, supports, default_size)
    wires += _runs(r, raw, default_size)
    if not wires:
        r.fail("spans", "", "the site has no aerial wire: add [[spans]] between [supports] or a [[runs]] polyline")
    receiver = _receiver(r, raw)
    lead_notes: list[str] = []
    lead, receiver = _lead_in(r, raw, supports, wires, receiver, default_size, lead_notes)
    if lead is not None:
        wires.append(lead)
    electrodes, earth_wires, notes = _earth(r, raw, receiver, default_size, soil)
    notes = lead_notes + notes
    wires += earth_wires
    _check_counterpoise(r, wires, receiver)
    position = _position(r, site_t, "site")
    stations = _stations(r, raw, soil, soil_notes, position)
    night = _night_inputs(r, site_t, position)
    plan = r.table(raw, "", "plan")
    _check_wires(r, wires)
    _check_piece_count(r, wires)
    _check_overlaps(r, wires)
    return Site(
        path=path, name=name, text=text, region=region, noise=noise, soil=soil, bands=bands,
        frequency_step_hz=steps, supports=supports, wires=wires, receiver=receiver, electrodes=electrodes,
        stations=stations, field_strength_v_per_m=field_strength, plan=plan,
        notes=soil_notes + _earphone_notes(raw, receiver) + notes, raw=raw,
        latitude_deg=position[0] if position else None, longitude_deg=position[1] if position else None, **night,
    )


#: Earphone impedances, as written, that are most likely a headset's marking: its DC resistance. [ohm]
MARKED_HEADSET_OHM = (1000.0, 5000.0)


def _earphone_notes(raw, receiver) -> list[str]:
    """A note when the earphone is given as a figure a magnetic headset is marked with (its DC resistance)."""
    ear = (raw.get("receiver") or {}).get("earphone")
    if ear is None or (isinstance(ear, str) and "impedance" in ear.lower()):
        return []
    if not MARKED_HEADSET_OHM[0] <= receiver.earphone_ohm <= MARKED_HEADSET_OHM[1]:
        return []
    written = f'"{ear}"' if isinstance(ear, str) else f"{ear}"
    return [f"receiver.earphone = {written} is taken as the earphone's impedance at audio frequencies; a magnetic "
            "headset is marked with its DC resistance (2000 Ω) and is roughly 10 kΩ at 1 kHz: write "
            'earphone = "high-impedance" for one (the detector\'s load on the tank, and so the loaded Q, follows '
            "this figure)"]


def _bands(r: TableReader, site_t) -> list:
    value = site_t.get("bands", ["mf"])
    if not isinstance(value, list) or not value:
        r.fail("site.bands", value, 'expected a list such as ["mf"], ["lf", "mf", "hf"] or [{from = "500 kHz", to = "1.7 MHz"}]')
    if len(value) > MAX_BAND_ENTRIES:
        r.fail(f"site.bands[{MAX_BAND_ENTRIES}]", f"{len(value)} bands", f"too many bands: at most {MAX_BAND_ENTRIES} entries")
    out = []
    for i, item in enumerate(value):
        key = f"site.bands[{i}]"
        if isinstance(item, str):
            named = NAMED_BANDS.get(item.strip().lower())
            if named is None:
                common = BAND_EVERYDAY_NAMES.get(" ".join(item.strip().lower().replace("-", " ").split()))
                hint = f'did you mean "{common[0]}" ({common[1]})? ' if common else ""
                r.fail(key, item, hint + "expected a band name: " + ", ".join(f'"{n}"' for n in NAMED_BANDS))
            out += named
        elif isinstance(item, dict):
            r.check_keys(item, key, {"from", "to", "name"})
            lo = r.quantity(item, key, "from", units.FREQUENCY_UNITS, "a frequency", "Hz")
            hi = r.quantity(item, key, "to", units.FREQUENCY_UNITS, "a frequency", "Hz")
            if lo is None or hi is None or hi <= lo:
                r.fail(key, item, 'expected {from = "...", to = "..."} with "to" above "from"')
            if lo < 10e3 or hi > 30e6:
                r.fail(key, item, "expected a band inside 10 kHz - 30 MHz (the range aerial models)")
            out.append((r.string(item, key, "name", default=f"{lo / 1e3:g}-{hi / 1e3:g} kHz"), lo, hi))
        else:
            r.fail(key, item, "expected a band name or a {from, to} table")
    return out


def _steps(r: TableReader, site_t) -> dict:
    value = site_t.get("frequency_step")
    if value is None:
        return {}
    try:
        step = units.parse_quantity(value, units.FREQUENCY_UNITS, "a frequency step", "Hz")
    except units.UnitError as err:
        r.fail("site.frequency_step", value, err.expected)
    if not 100.0 <= step <= 1e6:
        r.fail("site.frequency_step", value, "expected a step from 100 Hz to 1 MHz")
    return {"all": step}


def sweep_count(bands, step_hz: float) -> int:
    """Frequencies a sweep of ``bands`` at ``step_hz`` computes (before shared edges are merged).

    >>> sweep_count([("MF broadcast", 520e3, 1710e3)], 10e3)
    120
    """
    return sum(min(MAX_POINTS_PER_BAND, max(2, math.ceil((hi - lo) / step_hz) + 1)) for _n, lo, hi in bands)


def check_sweep_size(bands, step_hz: float, where: str) -> None:
    """Raise :class:`ValueError` with a message for the user when a sweep exceeds :data:`MAX_FREQUENCIES`."""
    n = sweep_count(bands, step_hz)
    if n > MAX_FREQUENCIES:
        raise ValueError(f"{where}: a step of {step_hz:g} Hz over these bands gives {n:,} frequencies; at most "
                         f"{MAX_FREQUENCIES:,} are computed: use a coarser step or fewer bands")


SOIL_CHOICES = ("expected a soil category (" + ", ".join(f'"{c}"' for c in SOILS) + ") or a word for the ground ("
                + ", ".join(f'"{w}"' for w in SOIL_WORDS) + ") or how good it is (\"good\", \"average\", \"poor\")")


def _gauge_hint(text) -> str:
    """ 'did you mean "20 AWG"? ' for a gauge whose system is misspelt ("20 AGW", "20 awgg"); else "".

    >>> _gauge_hint("20 AGW")
    'did you mean "20 AWG"? '
    >>> _gauge_hint("twenty")
    ''
    """
    m = re.fullmatch(r"(\S+?)\s*([A-Za-z]+)", text or "")
    near = units.closest_word(m.group(2).lower(), ["awg", "swg"]) if m else None
    return f'did you mean "{m.group(1)} {near.upper()}"? ' if near else ""


def soil_base(r: TableReader, written, key, notes: list) -> Soil:
    """The soil category a category name or a homeowner's word stands for; the mapping goes into ``notes``."""
    found = soil_category(written) if isinstance(written, str) else None
    if found is None:
        r.fail(key, written, SOIL_CHOICES)
    category, note = found
    if note and f"{key}: {note}" not in notes:
        notes.append(f"{key}: {note}")
    return SOILS[category]


def _soil(r: TableReader, value, key, notes: list) -> SoilSpec:
    as_text = isinstance(value, str)
    if as_text:
        value = {"category": value}
    if not isinstance(value, dict):
        r.fail(key, value, 'expected a soil category such as "medium-dry" or a [soil] table')
    r.check_keys(value, key, {"category", "conductivity", "resistivity", "relative_permittivity", "notes"})
    category = value.get("category")
    base: Soil | None = None
    if category is not None:
        base = soil_base(r, category, key if as_text else f"{key}.category", notes)
    sigma = None
    if "conductivity" in value:
        sigma = r.quantity(value, key, "conductivity", units.CONDUCTIVITY_UNITS, "a conductivity", "S/m", positive=False)
        if sigma <= 0:
            r.fail(f"{key}.conductivity", value["conductivity"], "a conductivity must be greater than zero (S/m)")
    if "resistivity" in value:
        rho = r.quantity(value, key, "resistivity", units.RESISTIVITY_UNITS, "a resistivity", "ohm m", positive=False)
        if rho <= 0:
            r.fail(f"{key}.resistivity", value["resistivity"], "a resistivity must be greater than zero (ohm m)")
        if sigma is not None:
            r.fail(f"{key}.resistivity", value["resistivity"], "give conductivity or resistivity, not both")
        sigma = 1.0 / rho
    eps = r.number(value, key, "relative_permittivity", low=1.0, high=100.0, what="a relative permittivity")
    if base is None and sigma is None:
        r.fail(key, value, "expected a category or a conductivity/resistivity")
    # a permittivity given in the file is a measurement and is kept; otherwise the category's range (ITU-R P.527)
    eps_range = (None, None) if eps is not None else (
        (base.relative_permittivity_low, base.relative_permittivity_high) if base else
        (SOILS["medium-dry"].relative_permittivity_low, SOILS["medium-dry"].relative_permittivity_high))
    if sigma is not None:
        eps = eps if eps is not None else (base.relative_permittivity if base else SOILS["medium-dry"].relative_permittivity)
        # a measured value: assume it is known within a factor of 2 either way
        return SoilSpec(
            "measured" if base is None else base.name, eps, sigma, sigma / 2.0, sigma * 2.0,
            "user-given conductivity (taken as known within a factor of 2)", *eps_range,
        )
    return SoilSpec(
        base.name, eps if eps is not None else base.relative_permittivity, base.conductivity_s_m,
        base.conductivity_low_s_m, base.conductivity_high_s_m, f"{base.source}: {base.description}", *eps_range,
    )


_SIZE_KEYS = {"gauge", "diameter", "cross_section", "material"}


def wire_size(r: TableReader, t: dict, key: str, default: WireSize | None) -> WireSize:
    given = [k for k in ("gauge", "diameter", "cross_section") if k in t]
    if len(given) > 1:
        r.fail(f"{key}.{given[1]}", t[given[1]], f"give only one of gauge, diameter or cross_section (also has {given[0]})")
    material = default.material if default else "copper"
    if "material" in t:
        m = t["material"]
        name = m.strip().lower() if isinstance(m, str) else None
        name = CONDUCTOR_ALIASES.get(name, name) if name else None
        if name not in CONDUCTORS:
            r.fail(f"{key}.material", m, "expected a conductor: " + ", ".join(f'"{c}"' for c in CONDUCTORS))
        material = name
    if not given:
        if default is not None:
            return WireSize(default.radius_m, material, default.described_as)
        return WireSize(units.awg_diameter(14) / 2, material, "14 AWG (default)")
    what = given[0]
    value = t[what]
    if what == "diameter" and isinstance(value, str) and re.fullmatch(r"\S+\s*(awg|swg)", value.strip(), re.IGNORECASE):
        what = "gauge"  # "14 AWG" names a diameter too: read it as the gauge it is
    if what == "gauge":
        text = str(value).strip() if isinstance(value, (str, int)) and not isinstance(value, bool) else None
        m = re.fullmatch(r"(\S+)\s*(awg|swg)", text, re.IGNORECASE) if text else None
        if not m:
            r.fail(f"{key}.{given[0]}", value, _gauge_hint(text) + 'expected a gauge with its system, such as "14 AWG" '
                   'or "16 SWG"')
        try:
            n = units.parse_gauge(m.group(1))
        except units.UnitError as err:
            r.fail(f"{key}.{given[0]}", value, err.expected)
        system = m.group(2).upper()
        if system == "AWG":
            if not -3 <= n <= 40:
                r.fail(f"{key}.{given[0]}", value, "expected an AWG gauge from 4/0 to 40")
            d = units.awg_diameter(n)
        else:
            if n not in units.SWG_INCHES:
                r.fail(f"{key}.{given[0]}", value, "expected an SWG gauge from 7/0 to 50")
            d = units.swg_diameter(n)
        desc = f"{m.group(1)} {system}"
    elif what == "diameter":
        d = r.length(t, key, "diameter", positive=True)
        desc = metres(d) + " diameter"
    else:
        area = r.quantity(t, key, "cross_section", units.AREA_UNITS, "a cross-section", "mm2")
        d = 2.0 * math.sqrt(area / math.pi)
        desc = f"{area * 1e6:g} mm² cross-section"
    if d > 0.2:
        r.fail(f"{key}.{what}", value, "a wire diameter above 200 mm is not a wire; check the unit")
    if d < MIN_WIRE_DIAMETER_M:
        r.fail(f"{key}.{what}", value, f"a wire diameter below {MIN_WIRE_DIAMETER_M * 1e3:g} mm is thinner than any "
               "gauge; check the unit")
    return WireSize(d / 2.0, material, desc)


def _supports(r: TableReader, raw) -> dict:
    table = r.table(raw, "", "supports")
    if len(table) > MAX_SUPPORTS:
        name = list(table)[MAX_SUPPORTS]
        r.fail(f"supports.{shown_key(name)}", f"{len(table)} supports",
               f"too many supports: a site names at most {MAX_SUPPORTS}")
    out = {}
    for name, t in table.items():
        key = f"supports.{shown_key(name)}"
        if not isinstance(t, dict):
            r.fail(key, t, "expected a table with at = [x, y] and height")
        r.check_keys(t, key, {"at", "height", "kind", "height_tolerance", "notes"})
        if "at" not in t:
            r.fail(f"{key}.at", "", "missing: expected a plan position at = [x, y]")
        x, y = r.plan_point(t["at"], f"{key}.at")
        h = r.length(t, key, "height", required=True)
        if h < 0:
            r.fail(f"{key}.height", t["height"], "a point below ground: a support height is measured up from the ground")
        if h == 0:
            r.fail(f"{key}.height", t["height"], "a support of zero height would lay the wire on the ground; expected a height above 0")
        if h < MIN_HEIGHT_M:
            r.fail(f"{key}.height", t["height"], f"a support lower than {MIN_HEIGHT_M * 100:g} cm; check the number and its unit")
        kind = r.string(t, key, "kind", default="other", choices=SUPPORT_KINDS)
        tol = r.length(t, key, "height_tolerance", default=HEIGHT_TOLERANCE_M[kind])
        if tol < 0:
            r.fail(f"{key}.height_tolerance", t["height_tolerance"], "expected a tolerance of 0 or more")
        out[name] = Support(name, x, y, h, kind, tol)
    return out


def _spans(r: TableReader, raw, supports, default_size) -> list:
    out = []
    for i, t in enumerate(r.array_of_tables(raw, "", "spans")):
        key = f"spans[{i}]"
        r.check_keys(t, key, {"from", "to", "sag", "name", "notes"} | _SIZE_KEYS)
        ends = []
        for end in ("from", "to"):
            v = t.get(end)
            if not isinstance(v, str):
                r.fail(f"{key}.{end}", v if v is not None else "", "expected the name of a support in [supports]")
            if v not in supports:
                known = ", ".join(f'"{s}"' for s in supports) or "none defined"
                r.fail(f"{key}.{end}", v, f"no support of that name (supports: {known})")
            ends.append(supports[v])
        a, b = ends
        p0 = np.array([a.x_m, a.y_m, a.height_m])
        p1 = np.array([b.x_m, b.y_m, b.height_m])
        if np.linalg.norm(p1 - p0) < JOIN_TOLERANCE_M:
            r.fail(f"{key}.to", t["to"], f"a zero-length span: \"{a.name}\" and \"{b.name}\" are at the same place")
        sag = r.length(t, key, "sag", default=0.0)
        if sag < 0:
            r.fail(f"{key}.sag", t["sag"], "expected a sag of 0 or more (how far the middle hangs below the straight line)")
        low = min(a.height_m, b.height_m)
        if sag >= low:
            r.fail(f"{key}.sag", t["sag"], f"a sag deeper than the supports are high (lower support {low:g} m): the wire would touch the ground")
        size = wire_size(r, t, key, default_size)
        if sag > 0:
            s = np.linspace(0.0, 1.0, SAG_PIECES + 1)
            pts = p0[None, :] + s[:, None] * (p1 - p0)[None, :]
            pts[:, 2] -= 4.0 * sag * s * (1.0 - s)  # parabolic sag, deepest at mid-span
            marks = (a.name,) + (None,) * (SAG_PIECES - 1) + (b.name,)
        else:
            pts = np.vstack([p0, p1])
            marks = (a.name, b.name)
        name = r.string(t, key, "name", default=f"span {a.name} to {b.name}")
        out.append(WireRun(name, "aerial", pts, size, key, marks))
    return out


def _polyline(r: TableReader, value, key, min_points=2):
    if value is None:
        r.fail(key, "", f"missing: expected a list of at least {min_points} points [[x, y, height], ...]")
    if not isinstance(value, list) or len(value) < min_points:
        r.fail(key, value, f"expected a list of at least {min_points} points [[x, y, height], ...]")
    pts = np.array([r.point3(p, f"{key}[{j}]") for j, p in enumerate(value)], dtype=float)
    for j in range(1, len(pts)):
        if np.linalg.norm(pts[j] - pts[j - 1]) < JOIN_TOLERANCE_M:
            r.fail(f"{key}[{j}]", value[j], "a zero-length piece: this point repeats the one before it")
    return pts


def _runs(r: TableReader, raw, default_size) -> list:
    out = []
    for i, t in enumerate(r.array_of_tables(raw, "", "runs")):
        key = f"runs[{i}]"
        r.check_keys(t, key, {"points", "name", "notes"} | _SIZE_KEYS)
        pts = _polyline(r, t.get("points"), f"{key}.points")
        if np.any(pts[:, 2] <= 0):
            j = int(np.argmax(pts[:, 2] <= 0))
            r.fail(f"{key}.points[{j}]", t["points"][j], "an aerial point at or below ground; expected a height above 0")
        if np.any(pts[:, 2] < MIN_HEIGHT_M):
            j = int(np.argmax(pts[:, 2] < MIN_HEIGHT_M))
            r.fail(f"{key}.points[{j}]", t["points"][j], f"an aerial point lower than {MIN_HEIGHT_M * 100:g} cm above "
                   "ground; check the number and its unit")
        size = wire_size(r, t, key, default_size)
        name = r.string(t, key, "name", default=f"run {i + 1}")
        out.append(WireRun(name, "aerial", pts, size, key, (None,) * len(pts)))
    return out


def _receiver(r: TableReader, raw) -> Receiver:
    t = r.table(raw, "", "receiver")
    key = "receiver"
    r.check_keys(t, key, {
        "at", "height", "coupling", "coil", "capacitor", "coupling_capacitor", "tap", "primary", "coupling_factor",
        "detector", "earphone", "measured", "notes", "detector_tap", "interference_margin",
    })
    if "at" in t:
        x, y = r.plan_point(t["at"], "receiver.at")
    else:
        x = y = None
    h = r.length(t, key, "height", default=0.0)
    if h < 0:
        r.fail("receiver.height", t["height"], "a point below ground: heights are measured up from the ground")
    if 0 < h < MIN_HEIGHT_M:
        r.fail("receiver.height", t["height"], f"a height between 0 and {MIN_HEIGHT_M * 100:g} cm; write 0 for a "
               "receiver at ground level, or check the number and its unit")
    coupling = r.string(t, key, "coupling", default="direct", choices=COUPLINGS)
    inductance = None
    coil = None
    if "coil" in t:
        c = t["coil"]
        if isinstance(c, dict):
            r.check_keys(c, "receiver.coil", {"diameter", "turns", "gauge", "wire_diameter", "length", "pitch", "strands", "strand_gauge"})
            coil = _coil_winding(r, c)
        else:
            inductance = r.quantity(t, key, "coil", units.INDUCTANCE_UNITS, "an inductance", "H")
            r.within(t, key, "coil", inductance, *INDUCTANCE_RANGE_H, "a coil from 10 nH to 1 H")
    cap = t.get("capacitor")
    cmin = cmax = None
    if cap is not None:
        if not isinstance(cap, list) or len(cap) != 2:
            r.fail("receiver.capacitor", cap, 'expected the variable capacitor\'s range ["15 pF", "365 pF"]')
        vals = []
        for j, v in enumerate(cap):
            try:
                vals.append(units.parse_quantity(v, units.CAPACITANCE_UNITS, "a capacitance", "F"))
            except units.UnitError as err:
                r.fail(f"receiver.capacitor[{j}]", v, err.expected)
        cmin, cmax = vals
        if not 0 <= cmin < cmax:
            r.fail("receiver.capacitor", cap, "expected [minimum, maximum] with 0 <= minimum < maximum")
        if cmax > CAPACITANCE_MAX_F:
            r.fail("receiver.capacitor[1]", cap[1], "expected a tuning capacitor of at most 1 uF")
    cc = r.quantity(t, key, "coupling_capacitor", units.CAPACITANCE_UNITS, "a capacitance", "F")
    r.within(t, key, "coupling_capacitor", cc, 0.1e-12, CAPACITANCE_MAX_F, "a capacitance from 0.1 pF to 1 uF")
    tap = r.number(t, key, "tap", low=0.01, high=1.0, what="a tap position as a fraction of the coil's turns")
    primary = r.quantity(t, key, "primary", units.INDUCTANCE_UNITS, "an inductance", "H")
    r.within(t, key, "primary", primary, *INDUCTANCE_RANGE_H, "a primary from 10 nH to 1 H")
    kf = r.number(t, key, "coupling_factor", low=0.001, high=0.99, what="a coupling factor k")
    if coupling == "series capacitor" and cc is None:
        r.fail("receiver.coupling_capacitor", "", 'coupling "series capacitor" needs coupling_capacitor = "100 pF" (or similar)')
    if coupling == "separate primary" and (primary is None or kf is None):
        missing = "primary" if primary is None else "coupling_factor"
        r.fail(f"receiver.{missing}", "", 'coupling "separate primary" needs primary = "30 uH" (the primary\'s '
               "inductance) and coupling_factor = 0.3 (k between primary and coil)")
    if coupling == "coil tap" and tap is None:
        r.fail("receiver.tap", "", 'coupling "coil tap" needs tap = 0.25 (the fraction of turns from the earthy end)')
    detector = r.string(t, key, "detector", default="germanium", choices=DETECTORS)
    det_tap = r.number(t, key, "detector_tap", low=0.01, high=1.0, what="a tap position as a fraction of the coil's turns")
    margin = _decibels(r, t, key, "interference_margin", 0.0, 60.0)
    ear = t.get("earphone", "high-impedance")
    if isinstance(ear, str) and ear.strip().lower() in ("high-impedance", "high impedance"):
        ear_ohm = HIGH_IMPEDANCE_EARPHONE_OHM
    elif isinstance(ear, str) and ear.strip().lower() in ("low-impedance", "low impedance"):
        ear_ohm = LOW_IMPEDANCE_EARPHONE_OHM
    else:
        ear_ohm = r.quantity(t, key, "earphone", units.RESISTANCE_UNITS, "an earphone impedance", "ohm")
        r.within(t, key, "earphone", ear_ohm, *EARPHONE_RANGE_OHM, 'an earphone impedance from 1 ohm to 100 Mohm, '
                 'or "high-impedance" / "low-impedance"')
    measured = None
    if "measured" in t:
        m = r.table(t, key, "measured")
        r.check_keys(m, "receiver.measured", {"coil", "capacitor", "frequency", "bandwidth"})
        measured = {
            "inductance_h": r.quantity(m, "receiver.measured", "coil", units.INDUCTANCE_UNITS, "an inductance", "H"),
            "capacitor_f": r.quantity(m, "receiver.measured", "capacitor", units.CAPACITANCE_UNITS, "a capacitance", "F", positive=False),
            "frequency_hz": r.quantity(m, "receiver.measured", "frequency", units.FREQUENCY_UNITS, "a frequency", "Hz"),
            "bandwidth_hz": r.quantity(m, "receiver.measured", "bandwidth", units.FREQUENCY_UNITS, "a bandwidth", "Hz"),
        }
        for name in ("inductance_h", "capacitor_f", "frequency_hz"):
            if measured[name] is None:
                r.fail("receiver.measured", m, "a measured resonance needs coil, capacitor and frequency")
        mk = "receiver.measured"
        r.within(m, mk, "coil", measured["inductance_h"], *INDUCTANCE_RANGE_H, "a coil from 10 nH to 1 H")
        r.within(m, mk, "capacitor", measured["capacitor_f"], 0.0, CAPACITANCE_MAX_F, "a capacitance from 0 to 1 uF")
        r.within(m, mk, "frequency", measured["frequency_hz"], 10e3, 30e6, "a frequency from 10 kHz to 30 MHz")
        if measured["bandwidth_hz"] is not None:
            r.within(m, mk, "bandwidth", measured["bandwidth_hz"], 1.0, measured["frequency_hz"],
                     "a bandwidth from 1 Hz up to the measured frequency")
    return Receiver(
        x_m=x if x is not None else float("nan"), y_m=y if y is not None else float("nan"), height_m=h,
        coupling=coupling, inductance_h=inductance, coil=coil, capacitor_min_f=cmin, capacitor_max_f=cmax,
        coupling_capacitor_f=cc, tap_fraction=tap, primary_inductance_h=primary, coupling_factor=kf,
        detector=detector, earphone_ohm=ear_ohm, measured=measured, given="at" in t,
        detector_tap_fraction=1.0 if det_tap is None else det_tap, interference_margin_db=margin,
        coupling_given="coupling" in t, detector_tap_given=det_tap is not None,
    )


def _decibels(r: TableReader, t, key, name, low, high):
    """A level in decibels: a number or text such as "20 dB"; None when absent."""
    if name not in t:
        return None
    v = t[name]
    text = v.strip() if isinstance(v, str) else None
    if text is not None and text.lower().endswith("db"):
        text = text[:-2].strip()
    try:
        value = float(text) if text is not None else (float(v) if isinstance(v, (int, float)) and not isinstance(v, bool) else None)
    except (ValueError, OverflowError):
        value = None
    if value is None or not (low <= value <= high):
        r.fail(f"{key}.{name}", v, f'expected a level in decibels from {low:g} to {high:g}, such as "20 dB"')
    return value


def _coil_winding(r: TableReader, c: dict) -> CoilWinding:
    """The ``[receiver.coil]`` table as a validated winding (SI units)."""
    key = "receiver.coil"
    dia = r.length(c, key, "diameter", required=True, positive=True)
    if "gauge" in c or "wire_diameter" in c:
        size = wire_size(r, {"gauge": c["gauge"]} if "gauge" in c else {"diameter": c["wire_diameter"]}, key, None)
        wire_d = 2 * size.radius_m
    else:
        r.fail(f"{key}.gauge", "", 'a coil needs its wire: gauge = "26 AWG" or wire_diameter = "0.4 mm"')
    turns = r.number(c, key, "turns", low=1, high=10000, what="a number of turns")
    length = r.length(c, key, "length", positive=True)
    pitch = r.length(c, key, "pitch", positive=True)
    strands = r.number(c, key, "strands", default=1, low=1, high=2000, integer=True, what="a whole number of strands")
    strand_d = None
    if strands > 1:
        if "strand_gauge" not in c:
            r.fail(f"{key}.strand_gauge", "", 'stranded wire needs strand_gauge = "40 AWG" (each strand)')
        strand_d = 2 * wire_size(r, {"gauge": c["strand_gauge"]}, key, None).radius_m
    if pitch is not None and pitch < wire_d:
        r.fail(f"{key}.pitch", c["pitch"], "the pitch is less than the wire's diameter: the turns would overlap")
    return CoilWinding(dia, wire_d, turns, length, pitch, int(strands), strand_d)


def _aerial_ends(wires):
    pts = []
    for w in wires:
        pts.append(w.points_m[0])
        pts.append(w.points_m[-1])
    return np.array(pts)


def _lead_in(r: TableReader, raw, supports, wires, receiver: Receiver, default_size, notes: list) -> tuple:
    t = r.table(raw, "", "lead_in")
    key = "lead_in"
    r.check_keys(t, key, {"from", "via", "notes"} | _SIZE_KEYS)
    start = None
    if "from" in t:
        v = t["from"]
        if isinstance(v, str):
            if v not in supports:
                known = ", ".join(f'"{s}"' for s in supports) or "none defined"
                r.fail("lead_in.from", v, f"no support of that name (supports: {known})")
            s = supports[v]
            start = np.array([s.x_m, s.y_m, s.height_m])
            ends = _aerial_ends(wires)
            if np.min(np.linalg.norm(ends - start, axis=1)) > JOIN_TOLERANCE_M and not _on_any_wire(start, wires):
                r.fail("lead_in.from", v, "the lead-in must start on the aerial: no span or run reaches that support")
        else:
            start = np.array(r.point3(v, "lead_in.from"))
            z = _wire_height_over(start, wires)
            if not _on_any_wire(start, wires) and z is not None and abs(z - start[2]) <= LEAD_IN_SNAP_M:
                # a down-lead written at a round height under a sagging span: it starts on the wire above or below
                notes.append(words("lead_in.from: the aerial wire is {z} high at that point (the point given is {d} "
                                   "{way}); the lead-in starts on the wire there", z=metres(z),
                                   d=metres(abs(z - start[2])), way="above it" if start[2] > z else "below it"))
                start = np.array([start[0], start[1], z])
            if not _on_any_wire(start, wires):
                near, gap = _nearest_on_wires(start, wires)
                r.fail("lead_in.from", v, "the lead-in must start on the aerial wire: this point is not on any span or "
                       f"run; the nearest point of the aerial is {metres(gap)} away, at "
                       f"[{near[0]:.2f}, {near[1]:.2f}, {near[2]:.2f}] (metres; a span with sag hangs lower mid-span)"
                       + _height_above(start, wires))
    if math.isnan(receiver.x_m):
        # no receiver position: the aerial's lowest end is the feed, straight down to ground.
        ends = _aerial_ends(wires)
        low = ends[np.argmin(ends[:, 2])] if start is None else start
        receiver = receiver._replace(x_m=float(low[0]), y_m=float(low[1]))
    feed = np.array([receiver.x_m, receiver.y_m, receiver.height_m])
    if start is None:
        ends = _aerial_ends(wires)
        d = np.linalg.norm(ends - feed, axis=1)
        start = ends[int(np.argmin(d))]
    via = []
    if "via" in t:
        via = list(_polyline(r, t["via"], "lead_in.via", min_points=1))
    pts = np.array([start, *via, feed], dtype=float)
    keep = [0]
    for j in range(1, len(pts)):
        if np.linalg.norm(pts[j] - pts[keep[-1]]) >= JOIN_TOLERANCE_M:
            keep.append(j)
    pts = pts[keep]
    if len(pts) < 2:
        return None, receiver  # the aerial comes straight to the receiver
    size = wire_size(r, t, key, default_size)
    return WireRun("lead-in", "lead-in", pts, size, key, (None,) * len(pts)), receiver


def _nearest_on_wires(point, wires) -> tuple:
    """The point of the wires nearest ``point`` and its distance from it. ([m] x3, [m])"""
    best = (None, math.inf)
    for w in wires:
        p = w.points_m
        a, b = p[:-1], p[1:]
        ab = b - a
        t = np.clip(np.einsum("ij,ij->i", point - a, ab) / np.maximum(np.einsum("ij,ij->i", ab, ab), 1e-30), 0, 1)
        q = a + t[:, None] * ab
        d = np.linalg.norm(q - point, axis=1)
        i = int(np.argmin(d))
        if d[i] < best[1]:
            best = (q[i], float(d[i]))
    return best


def _wire_height_over(point, wires):
    """The aerial's height where it passes over (or under) the point's plan position, None where it does not. [m]"""
    for w in wires:
        p = w.points_m
        for a, b in zip(p[:-1], p[1:]):
            ab = b[:2] - a[:2]
            n2 = float(ab @ ab)
            if n2 < 1e-12:
                continue
            t = float(np.clip((point[:2] - a[:2]) @ ab / n2, 0.0, 1.0))
            if np.linalg.norm(a[:2] + t * ab - point[:2]) <= JOIN_TOLERANCE_M:
                return float(a[2] + t * (b[2] - a[2]))
    return None


def _height_above(point, wires) -> str:
    """Where the aerial passes over the point's plan position, its height there in words ("" if it does not)."""
    z = _wire_height_over(point, wires)
    return "" if z is None else f"; straight above or below that plan position the aerial is {metres(z)} high"


def _on_any_wire(point, wires) -> bool:
    """Whether ``point`` lies on one of the wires (within the join tolerance)."""
    return _nearest_on_wires(point, wires)[1] <= JOIN_TOLERANCE_M


#: Gas in any spelling, case or punctuation ("gas-pipe", "Gas, yellow pipe", "GAS", "gaspipe", "natural_gas"),
#: but not a gasket.
_GAS = re.compile(r"gas(?!ket)", re.IGNORECASE)
#: A central-heating pipe or radiator ("radiator", "heating pipe", "under-floor heating", "CH pipe").
_HEATING = re.compile(r"radiator|heating|\bch[\s_-]*pipe", re.IGNORECASE)

GAS_REFUSAL = ("refused: gas piping is never an earth electrode (fire and explosion risk; codes forbid it). "
               "Use a driven rod, buried wire or a continuous metal cold-water pipe")
HEATING_REFUSAL = ("refused: a radiator or heating pipe is not an earth. A heating circuit is a closed loop inside the "
                   "building that reaches the ground, if at all, only through the boiler's bonding; plastic pipe, "
                   "valves and pumps break it, and a fault current on it would appear on every radiator. Use a "
                   "driven rod, buried wire or the incoming metal cold-water main")


def earth_text_refusal(text) -> str | None:
    """The refusal for free text that names gas piping or a heating pipe as an earth, else None.

    >>> earth_text_refusal("the Gas-pipe by the boiler")[:36]
    'refused: gas piping is never an eart'
    >>> earth_text_refusal("copper rod by the gasket store") is None
    True
    """
    text = str(text).replace("_", " ")
    if _GAS.search(text):
        return GAS_REFUSAL
    if _HEATING.search(text):
        return HEATING_REFUSAL
    return None


def _earth(r: TableReader, raw, receiver: Receiver, default_size, soil) -> tuple:
    t = r.table(raw, "", "earth")
    _refuse_gas_anywhere(r, t, "earth")
    r.check_keys(t, "earth", {"lead_via", "notes", "lead"} | set(EARTH_KINDS))
    electrodes: list[Electrode] = []
    wires: list[WireRun] = []
    notes: list[str] = []
    for i, rod in enumerate(r.array_of_tables(t, "earth", "rods")):
        key = f"earth.rods[{i}]"
        r.check_keys(rod, key, {"count", "length", "diameter", "spacing", "at", "notes"})
        count = r.number(rod, key, "count", default=1, low=1, high=64, integer=True, what="a whole number of rods")
        length = r.length(rod, key, "length", default=2.4, minimum=MIN_ELECTRODE_LENGTH_M)
        dia = r.length(rod, key, "diameter", default=0.016, positive=True)
        if dia >= length / 4:
            r.fail(f"{key}.diameter", rod.get("diameter", dia), "a rod's diameter must be small next to its length")
        spacing = r.length(rod, key, "spacing", default=length, positive=True)
        x, y = r.plan_point(rod["at"], f"{key}.at") if "at" in rod else (None, None)
        electrodes.append(Electrode("rods", key, count, length, dia, spacing, 0.0, x, y))
    for i, bw in enumerate(r.array_of_tables(t, "earth", "buried_wires")):
        key = f"earth.buried_wires[{i}]"
        r.check_keys(bw, key, {"count", "length", "depth", "at", "arrangement", "notes"} | _SIZE_KEYS)
        count = r.number(bw, key, "count", default=1, low=1, high=120, integer=True, what="a whole number of wires")
        length = r.length(bw, key, "length", required=True, minimum=MIN_ELECTRODE_LENGTH_M)
        depth = r.length(bw, key, "depth", default=0.15, positive=True)
        if depth > length:
            r.fail(f"{key}.depth", bw.get("depth"), f"a burial depth greater than the wire's length ({length:g} m); "
                   "a wire going straight down is a rod: use [[earth.rods]]")
        size = wire_size(r, bw, key, default_size)
        arrangement = r.string(bw, key, "arrangement", default="radials" if count > 1 else "straight", choices=("radials", "straight"))
        x, y = r.plan_point(bw["at"], f"{key}.at") if "at" in bw else (None, None)
        electrodes.append(Electrode("buried_wires", key, count, length, 2 * size.radius_m, 0.0, depth, x, y, arrangement=arrangement))
    if "water_pipe" in t:
        key = "earth.water_pipe"
        wp = r.table(t, "earth", "water_pipe")
        r.check_keys(wp, key, {"buried_length", "diameter", "depth", "continuous_metal", "at", "contents", "notes"})
        cont = r.boolean(wp, key, "continuous_metal")
        if cont is False:
            r.fail(f"{key}.continuous_metal", False, "refused as an earth: a pipe with a plastic section is not connected to the ground; "
                   "use a driven rod or buried wire instead")
        if cont is None:
            notes.append("The water pipe's continuity is not stated: it is an earth only if no plastic section "
                         "(repair, meter, filter) interrupts it. Check, or set continuous_metal = true.")
        length = r.length(wp, key, "buried_length", default=10.0, minimum=MIN_ELECTRODE_LENGTH_M)
        dia = r.length(wp, key, "diameter", default=0.022, positive=True)
        if dia >= length / 4:
            r.fail(f"{key}.diameter", wp.get("diameter", dia), "a pipe's diameter must be small next to its buried length")
        depth = r.length(wp, key, "depth", default=0.8, positive=True)
        if depth > length:
            r.fail(f"{key}.depth", wp.get("depth"), f"a burial depth greater than the pipe's buried length ({length:g} m)")
        x, y = r.plan_point(wp["at"], f"{key}.at") if "at" in wp else (None, None)
        electrodes.append(Electrode("water_pipe", key, 1, length, dia, 0.0, depth, x, y, continuous_metal=cont))
    if "building_earth" in t:
        key = "earth.building_earth"
        be = r.table(t, "earth", "building_earth")
        r.check_keys(be, key, {"resistance", "at", "notes"})
        res = r.quantity(be, key, "resistance", units.RESISTANCE_UNITS, "a resistance", "ohm")
        x, y = r.plan_point(be["at"], f"{key}.at") if "at" in be else (None, None)
        electrodes.append(Electrode("building_earth", key, 1, x_m=x, y_m=y, resistance_ohm=res))
    counterpoise = r.array_of_tables(t, "earth", "counterpoise")
    for i, cp in enumerate(counterpoise):
        key = f"earth.counterpoise[{i}]"
        r.check_keys(cp, key, {"points", "name", "notes"} | _SIZE_KEYS)
        pts = _polyline(r, cp.get("points"), f"{key}.points")
        if np.any(pts[:, 2] <= 0):
            j = int(np.argmax(pts[:, 2] <= 0))
            r.fail(f"{key}.points[{j}]", cp["points"][j], "a counterpoise is insulated above ground: expected a height above 0 "
                   "(a wire in the ground is a buried wire: use [[earth.buried_wires]])")
        if np.any(pts[:, 2] < MIN_HEIGHT_M):
            j = int(np.argmax(pts[:, 2] < MIN_HEIGHT_M))
            r.fail(f"{key}.points[{j}]", cp["points"][j], f"a counterpoise point lower than {MIN_HEIGHT_M * 100:g} cm "
                   "above ground; check the number and its unit")
        size = wire_size(r, cp, key, default_size)
        wires.append(WireRun(r.string(cp, key, "name", default=f"counterpoise {i + 1}"), "counterpoise", pts, size, key, (None,) * len(pts)))
    grounded = [e for e in electrodes]
    if not grounded and not counterpoise:
        r.fail("earth", t or "", "no earth: add [[earth.rods]], [[earth.buried_wires]], [earth.water_pipe], "
               "[earth.building_earth] or [[earth.counterpoise]]")
    # the earth lead from the receiver to the first electrode that has a position (else straight down)
    feed = np.array([receiver.x_m, receiver.y_m, receiver.height_m])
    if grounded:
        first = grounded[0]
        ex = first.x_m if first.x_m is not None else receiver.x_m
        ey = first.y_m if first.y_m is not None else receiver.y_m
        via = list(_polyline(r, t["lead_via"], "earth.lead_via", min_points=1)) if "lead_via" in t else []
        pts = np.array([feed, *via, [ex, ey, 0.0]], dtype=float)
        keep = [0]
        for j in range(1, len(pts)):
            if np.linalg.norm(pts[j] - pts[keep[-1]]) >= JOIN_TOLERANCE_M:
                keep.append(j)
        pts = pts[keep]
        lead_size = wire_size(r, r.table(t, "earth", "lead"), "earth.lead", default_size) if "lead" in t else default_size
        if "lead" in t:
            r.check_keys(t["lead"], "earth.lead", _SIZE_KEYS)
        if receiver.height_m > EARTH_LEAD_MIN_HEIGHT_M and len(pts) >= 2:
            wires.append(WireRun("earth lead", "earth lead", pts, lead_size, "earth", (None,) * len(pts)))
    return electrodes, wires, notes


def _refuse_gas_anywhere(r: TableReader, t, key):
    """Refuse gas piping or a heating pipe named anywhere in the earth: a key or any text under [earth]."""
    for name, value in t.items():
        full = f"{key}.{shown_key(name)}"
        why = earth_text_refusal(name)
        if why:
            r.fail(full, value, why)
        if isinstance(value, dict):
            _refuse_gas_anywhere(r, value, full)
        elif isinstance(value, list):
            for i, v in enumerate(value):
                if isinstance(v, dict):
                    _refuse_gas_anywhere(r, v, f"{full}[{i}]")
                elif isinstance(v, str) and earth_text_refusal(v):
                    r.fail(f"{full}[{i}]", v, earth_text_refusal(v))
        elif isinstance(value, str) and earth_text_refusal(value):
            r.fail(full, value, earth_text_refusal(value))


def _stations(r: TableReader, raw, soil: SoilSpec, notes: list, site_position=None) -> list:
    out = []
    tables = r.array_of_tables(raw, "", "stations")
    if len(tables) > MAX_STATIONS:
        r.fail(f"stations[{MAX_STATIONS}]", tables[MAX_STATIONS].get("name", ""),
               f"too many stations: a site lists at most {MAX_STATIONS} (every LF and MF broadcast channel fits)")
    for i, t in enumerate(tables):
        key = f"stations[{i}]"
        r.check_keys(t, key, {"name", "frequency", "power", "distance", "soil", "notes", "latitude", "longitude",
                              "bearing", "distance_to_sea"})
        name = r.string(t, key, "name", default=f"station {i + 1}")
        f = r.quantity(t, key, "frequency", units.FREQUENCY_UNITS, "a frequency", "Hz")
        if f is None:
            r.fail(f"{key}.frequency", "", 'missing: expected a frequency such as "810 kHz"')
        if not 10e3 <= f <= 30e6:
            plain = isinstance(t["frequency"], (int, float)) and 10 <= t["frequency"] < 30e3
            r.fail(f"{key}.frequency", t["frequency"], "expected a frequency from 10 kHz to 30 MHz"
                   + (f'; a plain number is in Hz: write "{t["frequency"]:g} kHz" for kilohertz' if plain else ""))
        p = r.quantity(t, key, "power", units.POWER_UNITS, "a transmitter power", "W")
        if p is None:
            r.fail(f"{key}.power", "", 'missing: expected a transmitter power such as "10 kW"')
        if not STATION_POWER_W[0] <= p <= STATION_POWER_W[1]:
            r.fail(f"{key}.power", t["power"], f"expected a transmitter power from {STATION_POWER_W[0] * 1e3:g} mW "
                   f"to {STATION_POWER_W[1] / 1e6:g} MW")
        if p < QUIET_STATION_POWER_W:
            notes.append(f"{key}.power: \"{t['power']}\" is read as {units.si_text(p, 'W')}, far below a broadcast "
                         "transmitter's (about 100 W to 2 MW); megawatts are written \"MW\", milliwatts \"mW\"")
        where = _position(r, t, key)
        bearing = _degrees(r, t, key, "bearing", -360.0, 360.0)
        if where is not None and ("distance" in t or bearing is not None):
            r.fail(f"{key}.distance" if "distance" in t else f"{key}.bearing", t.get("distance", t.get("bearing")),
                   "give the station's latitude and longitude, or its distance (and bearing), not both")
        if where is not None and site_position is None:
            r.fail(f"{key}.latitude", t["latitude"], "a station's position needs the site's own: add latitude and "
                   "longitude to [site] (or give the station's distance instead)")
        if where is not None:
            from aerial.models.skywave import great_circle

            dist, brg = great_circle(site_position[0], site_position[1], where[0], where[1])
            d, bearing = float(dist), float(brg)
            if d > MAX_STATION_DISTANCE_M:
                r.fail(f"{key}.latitude", t["latitude"], "expected a station on the same planet side: at most "
                       f"{MAX_STATION_DISTANCE_M / 1e3:g} km away")
        else:
            d = r.length(t, key, "distance", required=True, positive=True, maximum=MAX_STATION_DISTANCE_M,
                         units_table=units.DISTANCE_UNITS)
        if d < MIN_STATION_DISTANCE_M:
            plain = isinstance(t.get("distance"), (int, float))
            r.fail(f"{key}.distance", t["distance"], f"expected a distance of at least {MIN_STATION_DISTANCE_M:g} m "
                   "(the ground-wave model needs the receiver well away from the transmitter)"
                   + (f'; a plain number is in metres: write "{t["distance"]:g} km" or "{t["distance"]:g} mi"'
                      if plain else ""))
        st_soil = soil
        if "soil" in t:
            b = soil_base(r, t["soil"], f"{key}.soil", notes)
            st_soil = SoilSpec(b.name, b.relative_permittivity, b.conductivity_s_m, b.conductivity_low_s_m,
                               b.conductivity_high_s_m, f"{b.source}: {b.description}",
                               b.relative_permittivity_low, b.relative_permittivity_high)
        sea = r.length(t, key, "distance_to_sea", minimum=0.0, maximum=MAX_SEA_DISTANCE_M,
                       units_table=units.DISTANCE_UNITS)
        out.append(Station(name, f, p, d, st_soil, key, where[0] if where else None, where[1] if where else None,
                           None if bearing is None else bearing % 360.0, sea))
    return out


SEASONS = ("winter", "spring", "summer", "autumn")

#: Smoothed sunspot numbers accepted (a solar cycle peaks at 100–250). [1]
SUNSPOT_RANGE = (0.0, 400.0)


def _plain_float(value):
    """A TOML number as a float, or None for a boolean, a non-number or an integer no float can hold.

    TOML integers have no size limit in the reader; the loader's guard for huge integers
    (``TableReader.number``) refuses any beyond 2**63, so an angle, a level or an offset of
    hundreds of digits gets the key's own one-line error instead of an overflow.
    """
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return None
    if isinstance(value, int) and abs(value) > 2**63:
        return None
    return float(value)


#: The 16 points of the compass, clockwise from north (22.5° apart), for a bearing given as "W" or "SW".
COMPASS_POINTS = ("n", "nne", "ne", "ene", "e", "ese", "se", "sse", "s", "ssw", "sw", "wsw", "w", "wnw", "nw", "nnw")

#: The four cardinal directions in words.
COMPASS_WORDS = {"north": "n", "east": "e", "south": "s", "west": "w"}


def _compass_bearing(text: str):
    """Degrees clockwise from north of a compass point ("W", "SW", "north", "NNE"), or None."""
    point = COMPASS_WORDS.get(text, text)
    return 22.5 * COMPASS_POINTS.index(point) if point in COMPASS_POINTS else None


def _expected_angle(name, low, high) -> str:
    """What an angle key accepts, in words."""
    if name.endswith("bearing"):
        return (f"expected a {name} in degrees clockwise from true north (from {low:g} to {high:g}), such as 270 or "
                "\"270 deg\", or a compass point such as \"W\" or \"SW\"")
    return (f"expected a {name} in degrees from {low:g} to {high:g}, such as 51.5 or \"51.5 deg\""
            + (' or "51.5 N"' if name == "latitude" else ' or "0.12 W"' if name == "longitude" else ""))


def _degrees(r: TableReader, data, key, name, low, high):
    """An angle in degrees: a number, or text such as "51.5 deg", "51.5°", "51.5 N", "0.12 W"; a bearing also "SW"."""
    full = f"{key}.{name}"
    value = data.get(name)
    if value is None:
        return None
    hemi = {"n": 1.0, "e": 1.0, "s": -1.0, "w": -1.0}
    ok = True
    if isinstance(value, bool):
        ok = False
    elif isinstance(value, str) and name.endswith("bearing") and _compass_bearing(value.strip().lower()) is not None:
        v = _compass_bearing(value.strip().lower())
    elif isinstance(value, (int, float)):
        v = _plain_float(value)
        ok = v is not None
    elif isinstance(value, str):
        text = value.lower().replace("°", " deg ").replace("degrees", "deg").strip()
        sign = 1.0
        if text and text[-1] in hemi:
            if name.endswith("bearing"):
                r.fail(full, value, _expected_angle(name, low, high))
            if (text[-1] in "ns") != (name == "latitude"):
                r.fail(full, value, f"expected {'N or S' if name == 'latitude' else 'E or W'} after a {name}")
            sign = hemi[text[-1]]
            text = text[:-1].strip()
        text = text.removesuffix("deg").strip()
        if text.startswith(("-", "+")) and sign < 0:
            ok = False
        try:
            v = sign * float(text)
        except ValueError:
            ok = False
    else:
        ok = False
    if ok and not (math.isfinite(v) and low <= v <= high):
        ok = False
    if not ok:
        r.fail(full, value, _expected_angle(name, low, high))
    return v


def _position(r: TableReader, data, key):
    """(latitude, longitude) in degrees, or None when neither is given."""
    lat = _degrees(r, data, key, "latitude", -90.0, 90.0)
    lon = _degrees(r, data, key, "longitude", -180.0, 180.0)
    if (lat is None) != (lon is None):
        missing = "longitude" if lon is None else "latitude"
        r.fail(f"{key}.{missing}", "", "a position needs both latitude and longitude")
    return None if lat is None else (lat, lon)


def _night_inputs(r: TableReader, site_t, position=None) -> dict:
    """The [site] keys that set night-time reception: season, atmospheric noise, sunspots, the hour and the sea."""
    season = r.string(site_t, "site", "season", choices=SEASONS)
    fam = None
    if "atmospheric_noise" in site_t:
        v = site_t["atmospheric_noise"]
        text = v.strip().lower() if isinstance(v, str) else None
        try:
            fam = float(text.removesuffix("db").strip()) if text is not None else _plain_float(v)
        except ValueError:
            fam = None
        if fam is None or not (math.isfinite(fam) and 0.0 <= fam <= 140.0):
            r.fail("site.atmospheric_noise", v, 'expected the night-time atmospheric noise Fam at 1 MHz read from '
                   'the ITU-R P.372 maps, 0–140 dB above kT0b, such as "62 dB"')
    spots = r.number(site_t, "site", "sunspots", low=SUNSPOT_RANGE[0], high=SUNSPOT_RANGE[1],
                     what="a smoothed sunspot number")
    when, hour = _listening_time(r, site_t)
    date_iso, day = _date(r, site_t)
    offset = _utc_offset(r, site_t)
    if date_iso is not None and season is not None and position is not None:
        from_date = season_of(day, position[0])
        if from_date != season:
            r.fail("site.season", season, f"the date {date_iso} falls in {from_date} at this latitude; give one of "
                   "them, or both agreeing")
    if season is None and day is not None and position is not None:
        season = season_of(day, position[0])
    sea = r.length(site_t, "site", "distance_to_sea", minimum=0.0, maximum=MAX_SEA_DISTANCE_M,
                   units_table=units.DISTANCE_UNITS)
    sea_bearing = None
    if "sea_bearing" in site_t:
        sea_bearing = _degrees(r, site_t, "site", "sea_bearing", -360.0, 360.0) % 360.0
        if sea is None:
            r.fail("site.sea_bearing", site_t["sea_bearing"], "expected [site] distance_to_sea beside it (which way "
                   'the sea lies means nothing without how far): add a length such as distance_to_sea = "3 km", '
                   "or leave sea_bearing out")
    return {"season": season, "atmospheric_noise_db": fam, "sunspot_number": spots, "listening_time": when,
            "listening_hour": hour, "date_iso": date_iso, "day_of_year": day, "utc_offset_h": offset,
            "distance_to_sea_m": sea, "sea_bearing_deg": sea_bearing}


#: Named listening times: "evening" is two hours after sunset, "before dawn" an hour before sunrise.
LISTENING_TIMES = ("evening", "midnight", "before dawn")

#: Beyond this a terminal is inland: the sea gain has long gone (a distance is accepted up to it). [m]
MAX_SEA_DISTANCE_M = 20_000e3


def _listening_time(r: TableReader, site_t):
    """("evening" | "midnight" | "before dawn" | "clock", local clock hour or None)."""
    if "listening_time" not in site_t:
        return None, None
    v = site_t["listening_time"]
    text = v.strip().lower() if isinstance(v, str) else ""
    if text in LISTENING_TIMES:
        return text, {"midnight": 0.0}.get(text)
    m = re.fullmatch(r"(\d{1,2})[:.h](\d{2})", text)
    if m and int(m.group(1)) <= 24 and int(m.group(2)) < 60:
        return "clock", (int(m.group(1)) + int(m.group(2)) / 60.0) % 24.0
    r.fail("site.listening_time", v, 'expected "evening" (two hours after sunset), "midnight", "before dawn" '
           '(an hour before sunrise) or a local clock time such as "21:30"')


def _date(r: TableReader, site_t):
    """(ISO date text, day of the year) of the listening night, or (None, None)."""
    import datetime as dt

    if "date" not in site_t:
        return None, None
    v = site_t["date"]
    day = None
    if isinstance(v, dt.date) and not isinstance(v, dt.datetime):
        day = v
    elif isinstance(v, str):
        try:
            day = dt.date.fromisoformat(v.strip())
        except ValueError:
            day = None
    if day is None:
        r.fail("site.date", v, "expected a date such as 2025-01-15 (year-month-day)")
    return day.isoformat(), day.timetuple().tm_yday


def _utc_offset(r: TableReader, site_t):
    """The local clock's offset from UTC in hours ("+1", "-5:00", "UTC+5:30", 2), or None."""
    if "utc_offset" not in site_t:
        return None
    v = site_t["utc_offset"]
    hours = None
    if isinstance(v, (int, float)) and not isinstance(v, bool):
        hours = _plain_float(v)
    elif isinstance(v, str):
        m = re.fullmatch(r"(?:utc|gmt)?\s*([+-]?)(\d{1,2})(?::?(\d{2}))?(?:\s*h)?", v.strip().lower())
        if m:
            hours = (-1 if m.group(1) == "-" else 1) * (int(m.group(2)) + int(m.group(3) or 0) / 60.0)
    if hours is None or not (math.isfinite(hours) and -12.0 <= hours <= 14.0):
        r.fail("site.utc_offset", v, 'expected the local clock\'s offset from UTC in hours, -12 to +14, such as '
               '"+1", "-5" or "+5:30"')
    return hours


def season_of(day_of_year: int, latitude_deg: float) -> str:
    """The season of a day at a latitude as the ITU-R P.372 noise maps group the months.

    December–February is winter in the northern hemisphere, March–May spring, June–August
    summer and September–November autumn; the southern hemisphere's are the opposite (ITU-R
    P.372, from memory). Leap years are ignored (a day's shift at a month's edge).

    Examples
    --------
    >>> season_of(15, 52.0), season_of(15, -33.9), season_of(171, -33.9), season_of(335, 40.0)
    ('winter', 'summer', 'winter', 'winter')
    """
    # first days of March, June, September and December in a common year: 60, 152, 244, 335
    north = ("winter", "spring", "summer", "autumn", "winter")[
        sum(day_of_year >= edge for edge in (60, 152, 244, 335))]
    if latitude_deg >= 0:
        return north
    return {"winter": "summer", "summer": "winter", "spring": "autumn", "autumn": "spring"}[north]


def _check_wires(r: TableReader, wires):
    from aerial.models.segments import FEED_GAP_M

    for w in wires:
        # the electrical models lift aerial and counterpoise points lower than the feed gap up to it
        # (aerial.geometry.resolve); a piece must keep its length after that
        if w.role != "earth lead":
            lifted = np.array(w.points_m, dtype=float)
            lifted[:, 2] = np.maximum(lifted[:, 2], FEED_GAP_M)
            short = np.linalg.norm(np.diff(lifted, axis=0), axis=1) < JOIN_TOLERANCE_M
            if np.any(short):
                j = int(np.argmax(short))
                r.fail(w.key, w.name, f"points lower than {FEED_GAP_M * 100:g} cm are taken at {FEED_GAP_M * 100:g} cm "
                       f"(the feed gap), which leaves piece {j + 1} of \"{w.name}\" without length; raise its points")
        seg = np.linalg.norm(np.diff(w.points_m, axis=0), axis=1)
        j = int(np.argmin(seg))
        if seg[j] < MIN_LENGTH_TO_RADIUS * w.size.radius_m:
            r.fail(w.key, w.size.described_as,
                   f"the wire radius ({w.size.radius_m * 1e3:g} mm) is not small next to a {seg[j]:.3g} m piece of "
                   f"\"{w.name}\"; each straight piece must be at least {MIN_LENGTH_TO_RADIUS:g} radii long")


def _check_counterpoise(r: TableReader, wires, receiver: Receiver):
    """A counterpoise wire starts at the receiver's earth terminal (or on a counterpoise wire that does) and
    touches no aerial wire: one from anywhere else has no place in the circuit (the aerial's end is not the
    receiver's earth side), and one that touches the aerial shorts the aerial to the earth side."""
    from aerial.models.segments import FEED_GAP_M

    def lifted(p):
        p = np.array(p, dtype=float).reshape(-1, 3)
        p[:, 2] = np.maximum(p[:, 2], FEED_GAP_M)  # as the electrical models take them
        return p

    feed = lifted([receiver.x_m, receiver.y_m, receiver.height_m])[0]
    aerial = [w for w in wires if w.role in ("aerial", "lead-in")]
    joined: list[WireRun] = []
    for w in [w for w in wires if w.role == "counterpoise"]:
        pts = lifted(w.points_m)
        raw_pts = np.asarray(w.points_m, float)
        for j, q in enumerate(raw_pts):
            if np.linalg.norm(pts[j] - feed) <= JOIN_TOLERANCE_M:
                continue  # the receiver's terminals: aerial and earth sides meet there across the feed gap
            hit = next((a for a in aerial if _on_any_wire(q, [a])), None)
            if hit is not None:
                r.fail(f"{w.key}.points[{j}]", [round(float(v), 6) for v in q],
                       f'this counterpoise point is on the aerial ("{hit.name}"), which would short the aerial to the '
                       "earth side; a counterpoise starts at the receiver's earth terminal "
                       f"([{receiver.x_m:g}, {receiver.y_m:g}] at {receiver.height_m:g} m)")
        ends = pts[[0, -1]]
        at_feed = np.min(np.linalg.norm(ends - feed, axis=1)) <= JOIN_TOLERANCE_M
        on_other = any(_on_any_wire(e, [o]) for e in raw_pts[[0, -1]] for o in joined)
        if not (at_feed or on_other):
            r.fail(f"{w.key}.points[0]", [round(float(v), 6) for v in raw_pts[0]],
                   "a counterpoise starts at the receiver's earth terminal "
                   f"([{receiver.x_m:g}, {receiver.y_m:g}] at {receiver.height_m:g} m, [receiver] at and height) or "
                   "on another counterpoise wire that does; neither end of this one is there")
        joined.append(w)


def _check_table_count(r: TableReader, raw):
    """Refuse, before building anything, a file with more spans and runs than wire pieces allowed."""
    n = 0
    for name in ("spans", "runs"):
        value = raw.get(name)
        if isinstance(value, list):
            n += len(value)
            if n > MAX_WIRE_PIECES:
                r.fail(f"{name}[{len(value) - 1}]", f"{n} spans and runs",
                       f"too many wires: a site holds at most {MAX_WIRE_PIECES} straight wire pieces")


def _check_piece_count(r: TableReader, wires):
    """Refuse a site with more straight pieces than :data:`MAX_WIRE_PIECES`."""
    total = 0
    for w in wires:
        total += len(w.points_m) - 1
        if total > MAX_WIRE_PIECES:
            r.fail(w.key, f"{total} pieces so far",
                   f"too many wire pieces: a site holds at most {MAX_WIRE_PIECES} straight pieces (a sagging span "
                   f"counts {SAG_PIECES}); join straight runs, leave out sag, or describe fewer wires")


def _check_overlaps(r: TableReader, wires):
    """Refuse wires that lie along one another (a duplicated span, a run doubling back on itself).

    Points at the quarter, half and three-quarter marks of every straight piece
    are tested against every other piece; one closer than
    :data:`JOIN_TOLERANCE_M` to it (and not at a shared end) means two
    conductors occupy the same place, which no wire model can solve.
    """
    starts, ends, owner = [], [], []
    for i, w in enumerate(wires):
        p = np.asarray(w.points_m, float)
        starts.append(p[:-1])
        ends.append(p[1:])
        owner += [(i, j) for j in range(len(p) - 1)]
    a = np.vstack(starts)
    b = np.vstack(ends)
    n = len(a)
    if n < 2:
        return
    t = np.array([0.25, 0.5, 0.75])
    samples = a[:, None, :] + t[None, :, None] * (b - a)[:, None, :]  # (n, 3, 3): piece, sample, xyz
    ab = b - a
    ab2 = np.maximum(np.einsum("ij,ij->i", ab, ab), 1e-30)
    # every sample against every piece at once: (piece, sample, other piece)
    s = np.clip(np.einsum("ikj,mj->ikm", samples, ab) - np.einsum("mj,mj->m", a, ab), 0, None) / ab2
    s = np.clip(s, 0.0, 1.0)
    nearest = a + s[..., None] * ab
    d = np.linalg.norm(nearest - samples[:, :, None, :], axis=3)
    d[np.arange(n), :, np.arange(n)] = np.inf  # a piece against itself
    # a sample within the join tolerance of its own piece's ends sits at a joint, where wires meet by design
    own_end = np.minimum(np.linalg.norm(samples - a[:, None], axis=2), np.linalg.norm(samples - b[:, None], axis=2))
    d[own_end <= JOIN_TOLERANCE_M] = np.inf
    # so does a sample at the other piece's end: a T's down-lead leaving a straight span at its middle
    other_end = np.minimum(np.linalg.norm(samples[:, :, None, :] - a, axis=3),
                           np.linalg.norm(samples[:, :, None, :] - b, axis=3))
    d[other_end <= JOIN_TOLERANCE_M] = np.inf
    hits = np.argwhere(d < JOIN_TOLERANCE_M)  # in the order of the pieces, then of their samples
    if hits.size:
        i, j = int(hits[0][0]), int(hits[0][2])
        wi, wj = wires[owner[i][0]], wires[owner[j][0]]
        if wi is wj:
            r.fail(wi.key, wi.name, "the wire doubles back along itself; each wire must go somewhere new")
        r.fail(wj.key, wj.name, f"lies along \"{wi.name}\" (closer than {JOIN_TOLERANCE_M * 100:g} cm over its "
               "length): two wires in one place; remove the duplicate")
