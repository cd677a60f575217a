"""Run the method-of-moments solver for a site and shape its result like the closed-form one."""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ResourceLimit
from aerial.core.lengthtext import metres
from aerial.models.capacitance import electrostatic_solution
from aerial.models.fullwave import (
    DEFAULT_MAX_SEGMENT_WAVELENGTHS,
    DEFAULT_MEMORY_LIMIT,
    solve_full_wave,
)
from aerial.models.fullwave_geometry import DEFAULT_MIN_PIECES_PER_WIRE, piece_counts
from aerial.models.shapes import classify

GROUNDS = ("perfect", "lossy", "reflection-coefficient")

SPEED_OF_LIGHT = 299_792_458.0  # [m/s], exact (SI)

#: Memory a full-wave run may plan to use without ``allow_large``. [byte]
MEMORY_BUDGET_BYTES = 2 * 2**30

#: Time a full-wave run may plan to take without ``allow_large``. [s]
TIME_BUDGET_S = 600.0

#: Cost model of one frequency, fitted to direct-fill solves (one BLAS thread, this project's 2-core
#: reference machine; see docs/reliability.md): seconds = FILL_S_PER_N2 N^2 + SOLVE_S_PER_N3 N^3,
#: memory = MATRIX_COPIES 16 N^2 + BYTES_PER_UNKNOWN N. Measured: N = 686 -> 1.9 s, 224 MB;
#: N = 1358 -> 4.9 s, 413 MB; N = 2675 -> 17.5 s, 828 MB (one frequency, set-up included).
FILL_S_PER_N2 = 2.5e-6
SOLVE_S_PER_N3 = 1.0e-10
MATRIX_COPIES = 3
BYTES_PER_UNKNOWN = 250e3


def estimate_full_wave(segments, frequency) -> dict:
    """Unknowns, memory and time a full-wave sweep of ``segments`` over ``frequency`` will need.

    Parameters
    ----------
    segments : Segments
        The resolved wires.
    frequency : array_like
        The sweep. [Hz]

    Returns
    -------
    dict
        ``unknowns`` [1], ``frequencies`` [1], ``memory_bytes`` [byte] and
        ``seconds`` [s]: an upper estimate from the piece count the solver
        will use (pieces of at most DEFAULT_MAX_SEGMENT_WAVELENGTHS of the
        shortest wavelength, DEFAULT_MIN_PIECES_PER_WIRE per wire) and the
        cost model above, a direct fill at every frequency plus the
        convergence check at twice the pieces (a band sweep that reuses
        work runs faster).
    """
    f = np.atleast_1d(np.asarray(frequency, float))
    lam_min = SPEED_OF_LIGHT / float(f.max())
    n = int(np.sum(piece_counts(segments, DEFAULT_MAX_SEGMENT_WAVELENGTHS * lam_min, DEFAULT_MIN_PIECES_PER_WIRE)))
    per_freq = FILL_S_PER_N2 * n**2 + SOLVE_S_PER_N3 * n**3
    seconds = f.size * per_freq
    memory = MATRIX_COPIES * 16.0 * n**2 + BYTES_PER_UNKNOWN * n
    if (2 * n) ** 2 * 16 * 3 <= DEFAULT_MEMORY_LIMIT:  # the solver's convergence check at twice the pieces
        seconds += FILL_S_PER_N2 * (2 * n) ** 2 + SOLVE_S_PER_N3 * (2 * n) ** 3
    return {"unknowns": n, "frequencies": int(f.size), "memory_bytes": float(memory), "seconds": float(seconds)}


def check_full_wave_budget(segments, frequency, allow_large: bool = False, estimate: dict | None = None,
                           what: str = "the full-wave sweep") -> dict:
    """Raise :class:`ResourceLimit` when a sweep would pass the memory or time budget.

    Returns the estimate (see :func:`estimate_full_wave`, or ``estimate``
    when given) when it fits, or when ``allow_large`` is set. ``what`` names
    the run in the message.
    """
    est = estimate_full_wave(segments, frequency) if estimate is None else estimate
    if allow_large:
        return est
    over = []
    if est["memory_bytes"] > MEMORY_BUDGET_BYTES:
        over.append(f"about {est['memory_bytes'] / 2**30:.1f} GB of memory (budget {MEMORY_BUDGET_BYTES / 2**30:g} GB)")
    if est["seconds"] > TIME_BUDGET_S:
        over.append(f"about {_duration(est['seconds'])} (budget {_duration(TIME_BUDGET_S)})")
    if over:
        raise ResourceLimit(
            f"{what} needs {est['unknowns']} unknowns at {est['frequencies']} frequencies: "
            + " and ".join(over)
            + '; use fewer frequencies (--step "25 kHz" or fewer bands), fewer or shorter wires, '
            "the closed-form report (without --full-wave), or add --allow-large to run it anyway"
        )
    return est


def estimate_site_full_wave(geometry, frequency) -> dict:
    """What the report's full-wave sweep of ``geometry`` costs, the building's wire grid included.

    With a building the sweep solves the wire alone and the wire with the
    grid (:func:`building_full_wave_response`): the time is the sum, the
    memory the larger of the two. The estimate then also carries
    ``grid_wires`` [1] and ``grid_mesh_m`` [m].
    """
    if geometry.building is None:
        return estimate_full_wave(geometry.segments, frequency)
    mesh = building_mesh(frequency)
    gridded = with_building_grid(geometry.segments, geometry.building, mesh)
    est = estimate_full_wave(gridded, frequency)
    bare = estimate_full_wave(geometry.segments, frequency)
    est["seconds"] += bare["seconds"]
    est["memory_bytes"] = max(est["memory_bytes"], bare["memory_bytes"])
    est["grid_wires"] = int(len(gridded) - len(geometry.segments))
    est["grid_mesh_m"] = float(mesh)
    return est


def check_site_full_wave_budget(geometry, frequency, allow_large: bool = False) -> dict:
    """:func:`check_full_wave_budget` for the report's sweep of ``geometry``, the building's grid included."""
    est = estimate_site_full_wave(geometry, frequency)
    what = "the full-wave sweep"
    if "grid_wires" in est:
        what += (f" with the building as a wire grid ({est['grid_wires']} wires at a "
                 + metres(est["grid_mesh_m"]) + " mesh)")
    return check_full_wave_budget(geometry.segments, frequency, allow_large, estimate=est, what=what)


def _duration(seconds: float) -> str:
    if seconds < 120:
        return f"{seconds:.0f} s"
    if seconds < 7200:
        return f"{seconds / 60:.0f} min"
    return f"{seconds / 3600:.1f} h"


def full_wave_response(site, geometry, frequency, earth_ohm: float, progress=None, ground: str = "perfect",
                       allow_large: bool = False, convergence_check: bool = True) -> dict:
    """Per-frequency figures from the full-wave solver (arrays aligned with ``frequency``).

    With an earth lead the electrode's resistance is a lumped load where the
    lead meets the ground; a base-fed aerial gets the earth resistance in series.
    ``convergence_check=False`` skips the solver's second solve at twice the
    pieces (the tolerance runs of the ranges do: their figures are the same,
    the value's own run reports the convergence).
    """
    seg = geometry.segments
    if geometry.building is not None:
        return building_full_wave_response(site, geometry, frequency, earth_ohm, progress=progress, ground=ground,
                                           allow_large=allow_large, convergence_check=convergence_check)
    check_full_wave_budget(seg, frequency, allow_large)
    # the earth system's resistance at each frequency goes in series after the solve (base feed only)
    earth_f = np.broadcast_to(np.asarray(earth_ohm, float), (len(np.atleast_1d(frequency)),))
    series = 0.0
    kwargs = {}
    if ground != "perfect":
        kwargs = {"soil_permittivity": site.soil.relative_permittivity, "soil_conductivity": site.soil.conductivity_s_m}
    res = solve_full_wave(seg, np.asarray(frequency, float), ground=ground, series_ohm=series, progress=progress,
                          convergence_check=convergence_check, **kwargs)
    series_f = earth_f if geometry.base_fed else np.zeros_like(earth_f)
    z = np.asarray(res.impedance, complex) + series_f
    x = z.imag
    warnings = list(res.warnings)
    static = electrostatic_solution(seg)
    c_static = float(static.capacitance_f)
    cap = np.where(res.capacitive, res.capacitance, c_static)
    if not np.all(res.capacitive):
        f_bad = np.asarray(frequency)[~np.asarray(res.capacitive)]
        warnings.append(f"the aerial is inductive (past its first resonance) from {f_bad.min() / 1e3:.0f} kHz: "
                        "'capacitance presented' there shows the static value; use the reactance instead")
    rg = np.asarray(res.electrode_loss_resistance, float) + series_f + np.asarray(res.ground_loss_resistance, float)
    treatment = {"perfect": "perfect ground by images",
                 "lossy": "the site's soil as an exact half-space (Sommerfeld integrals); soil loss under the aerial "
                          "from the solved currents",
                 }.get(ground, "lossy ground by the reflection-coefficient approximation (fast, rough near the soil)")
    treatment += ("; earth electrode as a lumped resistance where the earth lead meets the ground" if not geometry.base_fed
                  else "; earth-system resistance in series at the feed")
    try:
        shape = classify(seg).as_dict()
    except Exception:  # the shape is descriptive only
        shape = None
    return {
        "model": res.model,
        "shape": shape,
        "capacitance_f": cap,
        "static_capacitance_f": np.full(len(z), c_static),
        "effective_height_m": np.abs(np.asarray(res.effective_height)),
        "radiation_resistance_ohm": np.asarray(res.radiation_resistance, float),
        "reactance_ohm": x,
        "conductor_loss_ohm": np.asarray(res.conductor_loss_resistance, float),
        "ground_loss_ohm": rg,
        "warnings": warnings,
        "ground_treatment": treatment,
        "loss_budget": {
            "soil_under_aerial_ohm": np.asarray(res.ground_loss_resistance, float),
            "soil_treatment": ("not modelled: perfect ground plane" if ground == "perfect" else treatment.split(";")[0]),
            "electrode_ohm": np.asarray(res.electrode_loss_resistance, float) + series_f,
            "electrode_treatment": ("earth electrodes' resistance (lossy lines in the soil, at the sweep's centre "
                                    "frequency) as a lumped load where the earth lead meets the soil"
                                    if not geometry.base_fed else
                                    "earth-system resistance (lossy lines in the soil) in series at the feed"),
        },
        "convergence": {
            "relative_change": float(res.convergence),
            "resistance_relative_change": float(res.convergence_resistance),
            "frequency_hz": float(res.convergence_frequency),
            "converged": bool(res.converged),
            "tolerance": float(res.convergence_tolerance),
            "unknowns": int(res.n_unknowns),
            "pieces": int(res.n_pieces),
        },
        "segments": {"unknowns": int(res.n_unknowns), "pieces": int(res.n_pieces), "band_method": res.band_method},
    }


#: Default grid spacing of a building in the full-wave solver (about a storey), at most a tenth of a wavelength. [m]
BUILDING_GRID_MESH_M = 3.0


def with_building_grid(segments, body, mesh_m):
    """The wire set with the building's wire grid added: grounded with the earth side, perfectly conducting.

    With no earth lead (a base-fed aerial) the grid is a separate grounded
    structure standing on the ground plane.
    """
    from aerial.models.building import building_grid
    from aerial.models.segments import Segments

    s, e, a = building_grid(body, mesh_m)
    n = len(s)
    lead = bool(np.any(segments.grounded))
    return Segments(
        np.vstack([segments.start, s]), np.vstack([segments.end, e]), np.r_[segments.radius, np.full(n, a)],
        np.r_[segments.grounded, np.full(n, lead)], segments.feed,
        np.r_[segments.wire_index, np.full(n, int(segments.wire_index.max()) + 1)],
        np.r_[segments.resistivity, np.zeros(n)], np.r_[segments.relative_permeability, np.ones(n)],
        segments.electrode_ohm,
    )


def building_mesh(frequency) -> float:
    """Grid spacing for a sweep: a storey, or a tenth of the shortest wavelength when that is less. [m]"""
    from aerial.models.building import GRID_MESH_WAVELENGTHS

    lam = SPEED_OF_LIGHT / float(np.max(frequency))
    return float(min(BUILDING_GRID_MESH_M, GRID_MESH_WAVELENGTHS * lam))


def building_full_wave_response(site, geometry, frequency, earth_ohm, progress=None, ground="perfect",
                                allow_large=False, mesh_m=None, convergence_check=True) -> dict:
    """Full-wave figures of a wire beside a building: the wire alone and with the building as a wire grid.

    The grid is a perfect conductor; the construction's shielding fraction s
    blends the two solutions as the closed form does (h = (1 - s) h_open +
    s h_grid, likewise Rr and X). The received voltage comes by reciprocity
    for a ground wave from every bearing: the site's station bearings when
    given, else the worst and best bearing, reported as a range.
    """
    from aerial.models.building import shielding_blend
    from aerial.models.fullwave_reception import arrival_effective_height, bearing_range

    body = geometry.building
    f = np.asarray(frequency, float)
    mesh = float(mesh_m) if mesh_m is not None else building_mesh(f)
    gridded = with_building_grid(geometry.segments, body, mesh)
    if mesh_m is None:
        check_site_full_wave_budget(geometry, f, allow_large)
    else:
        check_full_wave_budget(gridded, f, allow_large, what="the full-wave sweep with the building as a wire grid")
    bare = geometry._replace(building=None, building_site=None)
    out = full_wave_response(site, bare, f, earth_ohm, progress=None, ground=ground, allow_large=allow_large,
                             convergence_check=convergence_check)
    series = 0.0 if not geometry.base_fed else float(earth_ohm)
    kwargs = {}
    if ground != "perfect":
        kwargs = {"soil_permittivity": site.soil.relative_permittivity, "soil_conductivity": site.soil.conductivity_s_m}
    res = solve_full_wave(gridded, f, ground=ground, series_ohm=series, progress=progress,
                          convergence_check=convergence_check, **kwargs)
    s_lo, s_nom, s_hi = body.shielding
    span_ = bearing_range(res)
    bearings = [st.bearing_deg for st in site.stations if getattr(st, "bearing_deg", None) is not None]
    h_open = np.asarray(out["effective_height_m"], float)
    mean_grid = np.sqrt(span_["worst_m"] * span_["best_m"])
    h = shielding_blend(h_open, mean_grid, s_nom)
    rr_grid = np.asarray(res.radiation_resistance, float)
    out["effective_height_m"] = h
    out["radiation_resistance_ohm"] = shielding_blend(out["radiation_resistance_ohm"], rr_grid, s_nom)
    out["reactance_ohm"] = shielding_blend(out["reactance_ohm"], np.asarray(res.impedance).imag, s_nom)
    info = {
        "grid_mesh_m": mesh,
        "grid_wires": int(len(gridded) - len(geometry.segments)),
        "unknowns": int(res.n_unknowns),
        "shielding_ratio": [s_lo, s_nom, s_hi],
        "open_ground_effective_height_m": h_open,
        "grid_worst_effective_height_m": span_["worst_m"],
        "grid_best_effective_height_m": span_["best_m"],
        "worst_bearing_deg": span_["worst_bearing_deg"],
        "best_bearing_deg": span_["best_bearing_deg"],
        "effective_height_range_m": np.stack([shielding_blend(h_open, span_["worst_m"], s_hi),
                                              shielding_blend(h_open, span_["best_m"], s_lo)], axis=1),
    }
    if bearings:
        hb = np.abs(arrival_effective_height(res, bearings))
        info["station_bearings_deg"] = [float(b) for b in bearings]
        info["station_effective_height_m"] = shielding_blend(h_open[:, None], hb, s_nom)
    out["building_full_wave"] = info
    out["model"] = (res.model + "; the building as a grounded wire grid (" + metres(mesh)
                    + f" mesh, {info['grid_wires']} wires), blended with the open-ground solution by its construction's shielding")
    out["warnings"] = list(out["warnings"]) + [
        w for w in res.warnings if "meets the ground at" not in w and "touches the ground" not in w] + [
        "full wave with the building: the effective height shown is the middle (geometric mean) of the worst and "
        "best bearing of arrival; the range over bearings and the construction is in 'building_full_wave'; "
        "the conductor and earth losses are the wire's own (the building's induced currents are not counted as loss)"]
    out["convergence"]["unknowns_with_building"] = int(res.n_unknowns)
    if convergence_check:
        out["convergence"]["relative_change_with_building"] = float(res.convergence)
    return out

