"""Map the site's ``[receiver]`` and ``[[stations]]`` onto the reception models and back into JSON.

This is orchestration only: the physics is in :mod:`aerial.estimate.reception` and
:mod:`aerial.models`.
"""

from __future__ import annotations

import math

import numpy as np

from aerial.estimate import reception
from aerial.core import units
from aerial.core.errors import AerialError
from aerial.core.lengthtext import metres, metres_range
from aerial.models.skywave import SKY_WAVE_DISTANCE_RANGE_M

#: Tabulated frequencies per band in the tuning table.
TUNING_ROWS = 5


#: The variable capacitor assumed when the site gives neither coil nor capacitor: a common
#: broadcast-receiver tuning capacitor (an assumption, said in the report). [F]
ASSUMED_CAPACITOR_F = (15e-12, 365e-12)


#: Broadcast channel spacing by region (ITU Radio Regulations, Geneva 1975 plan: Regions 1 and 3
#: use 9 kHz, Region 2, the Americas, 10 kHz). Names are the ones [site] region accepts elsewhere,
#: lower-cased, plus the ITU region numbers.
TEN_KHZ_REGIONS = ("us", "usa", "united states", "ca", "canada", "mx", "mexico", "br", "brazil", "ar", "argentina",
                   "americas", "region 2")
NINE_KHZ_REGIONS = (
    "eu", "europe", "uk", "gb", "at", "be", "bg", "ch", "cy", "cz", "de", "dk", "ee", "es", "fi", "fr", "gr", "hr",
    "hu", "ie", "is", "it", "lt", "lu", "lv", "mt", "nl", "no", "pl", "pt", "ro", "se", "si", "sk",
    "au", "australia", "nz", "new zealand", "jp", "japan", "in", "india", "za", "south africa", "africa", "asia",
    "region 1", "region 3",
)


def channel_spacings(region) -> list:
    """Broadcast channel spacings [Hz] to judge selectivity by: the region's, or both when unknown.

    Examples
    --------
    >>> channel_spacings("US"), channel_spacings("de"), channel_spacings(None)
    ([10000.0], [9000.0], [9000.0, 10000.0])
    """
    norm = str(region or "").strip().lower()
    if norm in TEN_KHZ_REGIONS or norm.startswith("us-"):
        return [10e3]
    if norm in NINE_KHZ_REGIONS:
        return [9e3]
    return [9e3, 10e3]


def tuning_parts(site) -> reception.TuningParts:
    rx = site.receiver
    cal = None
    if rx.measured:
        m = rx.measured
        cal = reception.Calibration(m["inductance_h"], m["capacitor_f"], m["frequency_hz"], m.get("bandwidth_hz"))
    return reception.TuningParts(
        arrangement=rx.coupling,
        coil_inductance_h=rx.inductance_h,
        coil=site.receiver.coil,
        capacitor_min_f=rx.capacitor_min_f if not _needs_assumed_capacitor(rx) else ASSUMED_CAPACITOR_F[0],
        capacitor_max_f=rx.capacitor_max_f if not _needs_assumed_capacitor(rx) else ASSUMED_CAPACITOR_F[1],
        series_capacitance_f=rx.coupling_capacitor_f,
        tap_fraction=rx.tap_fraction,
        primary_inductance_h=rx.primary_inductance_h,
        coupling_coefficient=rx.coupling_factor,
        detector=rx.detector,
        earphone_ohm=rx.earphone_ohm,
        detector_tap_fraction=rx.detector_tap_fraction,
        calibration=cal,
        interference_margin_db=rx.interference_margin_db,
        capacitor_assumed=_needs_assumed_capacitor(rx),
    )


def _needs_assumed_capacitor(rx) -> bool:
    has_coil = rx.inductance_h is not None or (rx.coil is not None and rx.coil.turns is not None)
    return not has_coil and rx.capacitor_min_f is None


def _primary_band(site):
    for name, lo, hi in site.bands:
        if name.startswith("MF"):
            return name, lo, hi
    return site.bands[0]


#: Said of a station beyond the swept bands, whose aerial figures are worked out at its own frequency.
BEYOND_BANDS_NOTE = ("{f} lies outside the swept bands ({lo} to {hi}): the aerial's and the earth's figures are "
                     "worked out at its own frequency, but the tuning parts are designed for the {band} band only; "
                     "add its band to [site] bands for its own tuning")


def with_station_points(freqs, resp, beyond):
    """The sweep's frequencies and aerial arrays with the points ``beyond`` the grid merged in, in order.

    ``beyond``: ``(frequencies [Hz], response)`` from :func:`aerial.estimate.assemble.station_points`, or None.
    Returns ``(f, r, x, rr, he, station_columns)``: frequency [Hz], series resistance [ohm], reactance [ohm],
    radiation resistance [ohm], effective height [m] and the full-wave building solution's per-station
    effective heights [m] (None without one).
    """
    keys = ("series_resistance_ohm", "reactance_ohm", "radiation_resistance_ohm", "effective_height_m")
    f = np.asarray(freqs, float)
    cols = [np.asarray(resp[k], float) for k in keys]
    own = (resp.get("building_full_wave") or {}).get("station_effective_height_m")
    own = None if own is None else np.asarray(own, float).reshape(len(f), -1)
    if beyond is not None:
        fb, rb = np.asarray(beyond[0], float), beyond[1]
        order = np.argsort(np.concatenate([f, fb]), kind="stable")
        cols = [np.concatenate([c, np.asarray(rb[k], float)])[order] for c, k in zip(cols, keys)]
        if own is not None:
            extra = np.asarray(rb["building_full_wave"]["station_effective_height_m"], float).reshape(len(fb), -1)
            own = np.concatenate([own, extra])[order]
        f = np.concatenate([f, fb])[order]
    return (f, *cols, own)


def receiver_results(site, freqs, resp, beyond=None) -> tuple[dict, list, list]:
    """Tuning design and station verdicts for the site. Returns (tuning, stations, warnings).

    ``beyond``: the aerial at the station frequencies outside the swept grid
    (:func:`aerial.estimate.assemble.station_points`); those stations are heard with it.
    """
    work = ReceiverWork(site, freqs, resp, lambda: beyond)
    return work.join(work.tuning(), work.stations(), work.station_design())


class ReceiverWork:
    """:func:`receiver_results` as three independent pieces of work and the step that joins them.

    :meth:`tuning` (the tuning design), :meth:`stations` (each station's verdict by day and by night) and
    :meth:`station_design` (the tuning for the listed stations) need only the site, the sweep and the coil,
    which each works out on first use (:meth:`coil_and_parts`, the same in any process): the report shares
    them out between two processes (:func:`aerial.core.beside.shared`). :meth:`join` puts their results
    together as :func:`receiver_results` returns them, warnings in the same order.

    ``beyond``: a function of no arguments giving :func:`receiver_results`'s ``beyond``, called when a piece
    first needs it.
    """

    def __init__(self, site, freqs, resp, beyond):
        self.site, self.resp, self._beyond = site, resp, beyond
        f = np.asarray(freqs, float)
        self.f = f
        self.name, lo, hi = _primary_band(site)
        self.band = (lo, hi)
        self.in_band = (f >= lo - 1e-6) & (f <= hi + 1e-6)
        self._prepared = self._station_columns = None

    def coil_and_parts(self):
        """(band arrays (f, r, x) [Hz], [ohm], [ohm], the tuning parts with any coupling designed, the coupling's
        notes, the coil the tuning shows): resolved (or designed) once, the verdicts and the design for the
        stations use them too."""
        if self._prepared is None:
            site, m = self.site, self.in_band
            f = self.f[m]
            r = np.asarray(self.resp["series_resistance_ohm"], float)[m]
            x = np.asarray(self.resp["reactance_ohm"], float)[m]
            # a coil still to be designed: its coupling too, unless the site names one, so that the parts cover
            # the band
            parts, coupling_notes = reception.design_coupling(f, r, x, tuning_parts(site), self.band,
                                                              coupling_open=not site.receiver.coupling_given,
                                                              detector_tap_open=not site.receiver.detector_tap_given)
            coil = reception.tuning_coil(f, r, x, parts, band=self.band)
            self._prepared = (f, r, x), parts, coupling_notes, coil
        return self._prepared

    def _stations_at(self):
        """The sweep with the stations' own points merged in, and each station's own effective height."""
        if self._station_columns is None:
            f, r, x, rr, he, columns = with_station_points(self.f, self.resp, self._beyond())
            self._station_columns = (f, r, x, rr, he), station_effective_heights(self.site, f, columns)
        return self._station_columns

    def tuning(self) -> tuple[dict, list]:
        """The tuning design (the report's ``tuning`` less ``station_design``) and its warnings."""
        site = self.site
        (f, r, x), parts, coupling_notes, coil = self.coil_and_parts()
        warnings: list[str] = []
        tuning = reception.design_tuning(f, r, x, parts, band=self.band, range_curve=True, coil=coil)
        curve = tuning.pop("range_curve", None)
        curve_error = tuning.pop("range_curve_error", None)
        tuning["band"] = {"name": self.name, "from_hz": self.band[0], "to_hz": self.band[1]}
        tuning["arrangement"] = parts.arrangement
        tuning["channel_spacings_hz"] = channel_spacings(site.region)
        tuning["source"] = "measured" if parts.calibration else "estimate"
        if _needs_assumed_capacitor(site.receiver):
            tuning.setdefault("notes", []).insert(0, (
                "No coil or capacitor given: the coil is designed for a common 15–365 pF variable capacitor (an "
                "assumption). Give [receiver] coil and capacitor to check your own parts."))
        if coupling_notes:
            at = 1 if _needs_assumed_capacitor(site.receiver) else 0
            tuning.setdefault("notes", [])[at:at] = coupling_notes
            if parts.arrangement != site.receiver.coupling:
                tuning["coupling_designed"] = True
                if parts.arrangement == "series capacitor":
                    tuning["designed_series_capacitance_f"] = float(parts.series_capacitance_f)
                elif parts.arrangement == "coil tap":
                    tuning["designed_tap_ratio"] = float(parts.tap_fraction)
            if parts.detector_tap_designed:
                tuning["detector_tap_designed"] = True
        if len(site.bands) > 1:
            tuning.setdefault("notes", []).append(
                f"The tuning parts are designed for the {self.name} band; other bands need their own coil.")
        if curve is not None:
            tuning["range_curve"] = curve
        if curve_error is not None:
            warnings.append(f"tuning-range picture not drawn: {curve_error}")
        warnings += list(tuning.get("warnings", []))
        return tuning, warnings

    def stations(self) -> tuple[list, list]:
        """Each listed station's verdict by day and by night (the report's ``stations``) and their warnings."""
        site = self.site
        if not site.stations:
            return [], []
        _, parts, _, coil = self.coil_and_parts()
        (f, r, x, rr, he), own = self._stations_at()
        stations, night_warnings = _stations_day_and_night(site, f, r, x, rr, he, parts, own, band=self.band,
                                                           coil=coil)
        _say_beyond_bands(site, stations, (self.f[0], self.f[-1]), self.name)
        return stations, night_warnings

    def station_design(self) -> tuple[dict | None, list]:
        """The tuning for the listed stations (None without stations, or when it cannot be worked out) and the
        warning that says why not."""
        site = self.site
        if not site.stations:
            return None, []
        _, parts, _, coil = self.coil_and_parts()
        (f, r, x, rr, he), own = self._stations_at()
        day = [reception.Station(s.name, s.frequency_hz, s.power_w, s.distance_m, s.soil.relative_permittivity,
                                 s.soil.conductivity_s_m, effective_height_m=h) for s, h in zip(site.stations, own)]
        try:
            return reception.design_for_stations(f, r, x, rr, he, parts, day, self.band,
                                                 min(channel_spacings(site.region)), coil=coil), []
        except AerialError as err:
            return None, [f"tuning for the listed stations not worked out: {err}"]

    def join(self, tuning, stations, design) -> tuple[dict, list, list]:
        """:func:`receiver_results`'s (tuning, stations, warnings) from the three pieces' results."""
        (tuning, warnings), (stations, night_warnings), (design, design_warnings) = tuning, stations, design
        warnings = list(warnings)
        if self.site.stations:
            warnings += night_warnings + design_warnings
            if design is not None:
                tuning["station_design"] = design
            said = set(warnings) | set(tuning.get("notes", [])) | set(tuning.get("warnings", []))
            warnings += station_warnings(stations, said)  # once the tuning's own notes are all written
        return tuning, stations, warnings


def station_warnings(stations, said=frozenset()) -> list:
    """Each station's own warnings for the report's warnings, one line per text naming the stations it holds for.

    Texts in ``said`` (the tuning's notes and warnings: a bench calibration's, say) are left out, and so is the
    bleed-resistor warning of a series capacitor, which the tuning notes and the safety cautions say.

    >>> station_warnings([{"name": "A", "warnings": ["far"]}, {"name": "B", "warnings": ["far", "near"]}])
    ['A, B: far', 'B: near']
    >>> station_warnings([{"name": "A", "warnings": ["far", "calibrated"]}], {"calibrated"})
    ['A: far']
    """
    from aerial.models.tank import BLEED_REMEDY

    by_text: dict = {}
    for s in stations:
        for w in s.get("warnings", []):
            if BLEED_REMEDY not in w and w not in said:
                by_text.setdefault(w, []).append(s.get("name", ""))
    return [f"{', '.join(names)}: {w}" for w, names in by_text.items()]


def _say_beyond_bands(site, stations, sweep, band) -> None:
    """Each station outside the swept grid ``sweep`` (lowest, highest [Hz]) says what its figures stand on."""
    for s, src in zip(stations, site.stations):
        if src.frequency_hz < sweep[0] * (1 - 1e-9) or src.frequency_hz > sweep[1] * (1 + 1e-9):
            s.setdefault("warnings", []).insert(0, BEYOND_BANDS_NOTE.format(
                f=units.si_text(src.frequency_hz, "Hz"), lo=units.si_text(sweep[0], "Hz"),
                hi=units.si_text(sweep[1], "Hz"), band=band))


def station_effective_heights(site, freqs, cols) -> list:
    """Each station's own effective height where the full-wave building solution gives one for its bearing. [m]

    ``cols`` (``resp["building_full_wave"]["station_effective_height_m"]``) holds, per
    frequency, one column for each station with a bearing, in the site's
    order; each is taken at the station's frequency. None for a station
    without a bearing (or without a full-wave building solution): it keeps
    the aerial's middle figure, with the range over bearings beside it.
    """
    if cols is None:
        return [None] * len(site.stations)
    cols = np.asarray(cols, float).reshape(len(freqs), -1)
    out, j = [], 0
    for st in site.stations:
        if st.bearing_deg is None:
            out.append(None)
            continue
        out.append(float(np.interp(st.frequency_hz, freqs, cols[:, j])))
        j += 1
    return out


def _stations_day_and_night(site, f, r, x, rr, he, parts, own=None, band=None, coil=None) -> tuple[list, list]:
    """Station verdicts by day (ground wave) and by night (ground plus sky wave), each against its noise floor
    (heard with ``coil``, from :func:`reception.tuning_coil`, when given)."""
    from aerial.estimate import night

    freqs = [s.frequency_hz for s in site.stations]
    own = [None] * len(site.stations) if own is None else own
    moment = night.listening_moment(site)
    floor = night.noise_floor(site, freqs, moment)
    skies = night.sky_waves(site, moment=moment)
    category = site.noise.replace("-", " ")

    def condition(time_of_day):
        return [reception.Station(s.name, s.frequency_hz, s.power_w, s.distance_m, s.soil.relative_permittivity,
                                  s.soil.conductivity_s_m,
                                  sky_wave_field_v_per_m=sky["field_v_per_m"] if time_of_day == "night" else 0.0,
                                  atmospheric_noise_db=float(floor[time_of_day]["atmospheric_db"][i]),
                                  effective_height_m=own[i])
                for i, (s, sky) in enumerate(zip(site.stations, skies))]

    stations, by_night = reception.assess_stations_by_condition(f, r, x, rr, he, parts,
                                                                [condition("day"), condition("night")],
                                                                noise_category=category, band=band, coil=coil)
    for i, (s, n, sky, src) in enumerate(zip(stations, by_night, skies, site.stations)):
        s.setdefault("power_w", src.power_w)
        s.setdefault("distance_m", src.distance_m)
        s.setdefault("frequency_hz", src.frequency_hz)
        s.setdefault("name", src.name)
        if src.bearing_deg is not None:
            s["bearing_deg"] = src.bearing_deg
        s["effective_height_by_bearing"] = own[i] is not None
        s["noise_dominant"] = floor["day"]["dominant"][i]
        _, fading = night.combined_night_field(n["ground_wave_field_v_per_m"], sky["field_v_per_m"])
        s["night"] = {
            "verdict": n["verdict"],
            "verdict_text": n.get("verdict_text", n["verdict"]),
            "reason": n["reason"],
            **({"interference": n["interference"]} if "interference" in n else {}),
            "field_v_per_m": n["field_v_per_m"],
            "ground_wave_field_v_per_m": n["ground_wave_field_v_per_m"],
            "sky_wave_field_v_per_m": sky["field_v_per_m"],
            "sky_wave_field_range_v_per_m": sky["field_range_v_per_m"],
            "fading": fading,
            "detector_power_w": n["detector_power_w"],
            "audio_power_w": n["audio_power_w"],
            "signal_to_noise_db": n["signal_to_noise_db"],
            "noise_figure_db": n["noise_figure_db"],
            "noise_figure_range_db": [float(v[i]) for v in floor["night"]["noise_figure_range_db"]],
            "noise_dominant": floor["night"]["dominant"][i],
            "heard_behind": n.get("heard_behind", []),
            "spills_over": n.get("spills_over", []),
            "geomagnetic_latitude_deg": sky["geomagnetic_latitude_deg"],
            "geomagnetic_latitude_from": sky["geomagnetic_latitude_from"],
            "sky_wave_outside_method": sky["outside_method"],
            "listening_time": sky["listening_time"],
            "hourly_loss_db": sky["hourly_loss_db"],
            **({} if sky["time_after_sunset_at_midpoint_s"] is None else
               {"time_after_sunset_at_midpoint_s": sky["time_after_sunset_at_midpoint_s"]}),
            "sky_wave_in_daylight": sky["daylight_at_midpoint"],
            "sea_gain_db": sky["sea_gain_db"],
            "noise_time_block": floor["night"]["time_block"],
            "atmospheric_noise_db": float(floor["night"]["atmospheric_db"][i]),
        }
        s["noise_time_block"] = floor["day"]["time_block"]
    warnings = list(moment["notes"]) + list(floor["notes"])
    outside = [s.name for s, sky in zip(site.stations, skies) if sky["outside_method"]]
    if outside:
        warnings.append("Sky wave: the ITU-R P.1147 method holds for 150–1700 kHz and paths of "
                        + metres_range(*SKY_WAVE_DISTANCE_RANGE_M, "km", "–") + "; extended for " + ", ".join(outside)
                        + f" — treat {'its' if len(outside) == 1 else 'their'} night figures with care.")
    atm_night = [st["name"] for st in stations if st["night"]["noise_dominant"] == "atmospheric"]
    if atm_night:
        warnings.append("By night atmospheric noise (distant lightning), not man-made noise, sets the noise floor "
                        "for " + ", ".join(atm_night) + ".")
    return stations, warnings


#: Above these a single-layer coil is not something anyone winds: the helper says so.
PRACTICAL_TURNS = 2000
PRACTICAL_WINDING_LENGTH_M = 1.0


def wire_option(text, option: str) -> float:
    """A wire given as a gauge ("26 AWG", "24 SWG") or as a diameter ("0.4 mm"). [m]"""
    import re

    from aerial.site.reader import MIN_WIRE_DIAMETER_M

    m = re.fullmatch(r"\s*(\S+)\s*(awg|swg)\s*", str(text), re.IGNORECASE)
    if m:
        try:
            g = units.parse_gauge(m.group(1))
            if m.group(2).lower() == "awg" and not -3 <= g <= 40:
                raise KeyError(g)
            return units.awg_diameter(g) if m.group(2).lower() == "awg" else units.swg_diameter(g)
        except (units.UnitError, KeyError):
            raise AerialError(f"{option} {text}: not a gauge in that system (AWG 4/0 to 40, SWG 7/0 to 50)") from None
    try:
        d = units.parse_length(text)
    except units.UnitError:
        raise AerialError(f'{option} {text}: expected a gauge such as "26 AWG" or "24 SWG", or a diameter such as '
                          '"0.4 mm"') from None
    if not MIN_WIRE_DIAMETER_M <= d <= 0.05:
        raise AerialError(f"{option} {text}: expected a wire diameter from {MIN_WIRE_DIAMETER_M * 1e3:g} mm to 50 mm")
    return d


def _bare_number(text) -> bool:
    """Whether an option's text is a number with no unit (every option is text on the command line)."""
    try:
        float(str(text).strip())
    except ValueError:
        return False
    return True


def _option_quantity(text, option: str, parse, example_unit: str) -> float:
    """An option's quantity in SI units by ``parse`` (text -> float, raising units.UnitError); a refusal names the
    option, and a bare number is told to carry its unit (``example_unit`` in the example)."""
    try:
        return parse(text)
    except units.UnitError as err:
        if _bare_number(text):
            raise AerialError(f'{option} {text}: a unit is never guessed; write it, e.g. '
                              f'"{str(text).strip()} {example_unit}"') from None
        raise AerialError(f"{option} {text}: {err.expected}") from None


def _coil_inputs(diameter, wire, pitch, frequency, strands, strand_size):
    """The ``aerial coil`` options in SI units: (form diameter, wire diameter, pitch, frequency, strand diameter)."""
    def length(text, what):
        return _option_quantity(text, what, units.parse_length, "mm")

    d = length(diameter, "--diameter")
    if not 1e-3 <= d <= 10.0:
        raise AerialError(f"--diameter {diameter}: expected a former diameter from 1 mm to 10 m")
    wd = wire_option(wire, "--wire")
    p = length(pitch, "--pitch") if pitch else None
    f = _option_quantity(frequency, "--frequency",
                         lambda t: units.parse_quantity(t, units.FREQUENCY_UNITS, "a frequency", "Hz"), "kHz")
    if not 10e3 <= f <= 30e6:
        raise AerialError(f"--frequency {frequency}: expected a frequency from 10 kHz to 30 MHz")
    if p is not None and p < wd:
        raise AerialError(f"--pitch {pitch}: less than the wire's diameter ({wd * 1e3:.3g} mm): the turns would overlap")
    if not 1 <= strands <= 2000:
        raise AerialError(f"--strands {strands}: expected a whole number of strands from 1 to 2000")
    sd = None
    if strands > 1:
        if strand_size is None:
            raise AerialError(f'--strands {strands}: stranded wire needs --strand-size, each strand\'s gauge or diameter '
                              '(e.g. "40 AWG"); --wire is then the whole bundle')
        sd = wire_option(strand_size, "--strand-size")
        if sd * math.sqrt(strands) > wd * 1.001:
            raise AerialError(f"--strand-size {strand_size}: {strands} strands of {sd * 1e3:.3g} mm do not fit in a "
                              f"bundle of {wd * 1e3:.3g} mm (--wire)")
    elif strand_size is not None:
        raise AerialError("--strand-size is for stranded wire: give --strands as well (2 or more)")
    return d, wd, p, f, sd


def coil_design(*, diameter, wire, turns=None, inductance=None, pitch=None, strands=1, frequency="1 MHz",
                strand_size=None) -> dict:
    """The ``aerial coil`` helper: inductance from turns, or turns and winding length for an inductance.

    ``diameter`` is the former's outside diameter; the turns' own diameter, to the wire centres, is the
    former's plus one wire diameter (reported as ``winding_diameter_m``).
    """
    from aerial.models import coil as coil_mod
    from aerial.models import tank as tank_mod

    d, wd, p, f, sd = _coil_inputs(diameter, wire, pitch, frequency, strands, strand_size)
    out: dict = {"form_diameter_m": d, "wire_diameter_m": wd, "winding_diameter_m": d + wd, "frequency_hz": f,
                 "diameter_convention": "--diameter is the former's outside diameter; the inductance is computed for "
                                        "the turns at the wire centres (former + one wire diameter)"}
    if strands > 1:
        out.update({"strands": strands, "strand_diameter_m": sd})
    if turns is not None:
        if not (math.isfinite(turns) and 1 <= turns <= 10000):
            raise AerialError(f"--turns {turns:g}: expected a number of turns from 1 to 10000")
        L = float(np.asarray(coil_mod.solenoid_inductance(d, wd, turns, pitch=p)))
        out.update({"turns": turns, "inductance_h": L, "winding_length_m": turns * (p or wd),
                    "wire_length_m": turns * math.pi * (d + wd)})  # as winding_for_inductance counts it
    else:
        want = _option_quantity(inductance, "--inductance",
                                lambda t: units.parse_quantity(t, units.INDUCTANCE_UNITS, "an inductance", "H"), "uH")
        if not 10e-9 <= want <= 1.0:
            raise AerialError(f"--inductance {inductance}: expected an inductance from 10 nH to 1 H")
        one = float(np.asarray(coil_mod.solenoid_inductance(d, wd, 1.0, pitch=p)))
        if one > want:
            raise AerialError(f"--inductance {inductance}: one turn on a {d * 1e3:g} mm former already has "
                              f"{one * 1e6:.3g} uH; use a smaller former (--diameter)")
        design = coil_mod.winding_for_inductance(want, d, wd, pitch=p)
        out.update({k: (float(v) if isinstance(v, (int, float, np.floating, np.integer)) else v)
                    for k, v in design._asdict().items()})
        out["inductance_h"] = float(out.get("inductance_h", want))
        turns = out.get("turns")
    out["warnings"] = _absurd_coil(turns, turns * (p or wd), d)
    length = float(out.get("winding_length_m", out.get("winding_length")))
    c_self = coil_mod.medhurst_self_capacitance(d + wd, length)
    out["self_capacitance_f"] = float(c_self.capacitance)
    out["self_resonance_hz"] = float(tank_mod.resonant_frequency(out["inductance_h"], out["self_capacitance_f"]))
    note = coil_mod.self_capacitance_note(c_self, d + wd, length)
    if note:
        out["warnings"].append(note)
    near = self_resonance_note(f, out["self_resonance_hz"])
    if near:
        out["warnings"].append(near)
    loss = coil_mod.coil_loss(f, out["inductance_h"], d, wd, turns, pitch=p, strands=strands, strand_diameter=sd)
    for k, v in loss._asdict().items():
        if isinstance(v, (int, float, np.floating, np.ndarray)):
            out[k] = float(np.asarray(v))
        elif isinstance(v, (list, tuple)):
            out["warnings"].extend(v)
    from aerial.estimate.plain import finalise

    renames = {"turns_whole": "whole_turns", "winding_length": "winding_length_m", "inductance_whole": "inductance_whole_turns_h",
               "wire_length": "wire_length_m", "ac_resistance": "ac_resistance_ohm", "dc_resistance": "dc_resistance_ohm",
               "ac_factor": "ac_to_dc_resistance_ratio", "iterations": "solver_iterations"}
    out = {renames.get(k, k): v for k, v in out.items()}
    if "converged" in out:
        out["converged"] = bool(out["converged"])
    return finalise(out)


#: A coil is used well below its self-resonance: above this fraction of it the inductance it shows has risen by
#: more than 1 / (1 - (1/3)^2) - 1 = 12.5 % (common practice; the lumped coil with its self-capacitance across it).
SELF_RESONANCE_FRACTION = 1.0 / 3.0


def self_resonance_note(frequency_hz: float, self_resonance_hz: float) -> str | None:
    """A warning when the coil is used at or near its self-resonance, else None.

    The coil with its self-capacitance C_s across it shows L / (1 - (f / f_s)^2) below f_s and is no inductor
    above it.

    >>> self_resonance_note(1e6, 6.56e6) is None
    True
    >>> self_resonance_note(1e6, 658e3).startswith("1 MHz is above the coil's self-resonance (658 kHz)")
    True
    >>> self_resonance_note(1e6, 2.41e6).endswith("act as 1.21 times its inductance there (L / (1 - (f/f_s)^2))")
    True
    """
    ratio = float(frequency_hz) / float(self_resonance_hz)
    f, fs = units.si_text(frequency_hz, "Hz"), units.si_text(self_resonance_hz, "Hz")
    if ratio >= 1.0:
        return (f"{f} is above the coil's self-resonance ({fs}): there it is no inductor and the loss and Q shown do "
                "not apply; use fewer turns, spaced wider, or a multilayer or ferrite-cored coil")
    if ratio > SELF_RESONANCE_FRACTION:
        return (f"{f} is within a third of the coil's self-resonance ({fs}): its self-capacitance makes it act as "
                f"{1.0 / (1.0 - ratio ** 2):.2f} times its inductance there (L / (1 - (f/f_s)^2))")
    return None


def _absurd_coil(turns, winding_length_m, form_diameter_m) -> list[str]:
    """Warnings for a single-layer coil nobody would wind (e.g. 156,500 turns for 1 H)."""
    out = []
    if turns > PRACTICAL_TURNS or winding_length_m > PRACTICAL_WINDING_LENGTH_M:
        out.append(f"{turns:,.0f} turns in a winding " + metres(winding_length_m)
                   + " long is not a practical single-layer coil: use a larger former, or a multilayer or ferrite-cored coil (outside this helper's model)")
    elif winding_length_m > 10 * form_diameter_m:
        out.append(f"the winding is {winding_length_m / form_diameter_m:.0f} times as long as the former is wide: "
                   "a larger former gives the inductance with fewer turns and less wire")
    return out
