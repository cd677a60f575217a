"""Run the method-of-moments solver for a site and shape its result like the closed-form one."""

from __future__ import annotations

import numpy as np

from aerial.core.errors import ResourceLimit
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


def check_full_wave_budget(segments, frequency, allow_large: bool = False) -> dict:
    """Raise :class:`ResourceLimit` when a sweep would pass the memory or time budget.

    Returns the estimate (see :func:`estimate_full_wave`) when it fits, or
    when ``allow_large`` is set.
    """
    est = estimate_full_wave(segments, frequency)
    if allow_large:
        return est
    over = []
    if est["memory_bytes"] > MEMORY_BUDGET_BYTES:
        over.append(f"about {est['memory_bytes'] / 2**30:.1f} GB of memory (budget {MEMORY_BUDGET_BYTES / 2**30:g} GB)")
    if est["seconds"] > TIME_BUDGET_S:
        over.append(f"about {_duration(est['seconds'])} (budget {_duration(TIME_BUDGET_S)})")
    if over:
        raise ResourceLimit(
            f"the full-wave sweep needs {est['unknowns']} unknowns at {est['frequencies']} frequencies: "
            + " and ".join(over)
            + '; use fewer frequencies (--step "25 kHz" or fewer bands), fewer or shorter wires, '
            "the closed-form report (without --full-wave), or add --allow-large to run it anyway"
        )
    return est


def _duration(seconds: float) -> str:
    if seconds < 120:
        return f"{seconds:.0f} s"
    if seconds < 7200:
        return f"{seconds / 60:.0f} min"
    return f"{seconds / 3600:.1f} h"


def full_wave_response(site, geometry, frequency, earth_ohm: float, progress=None, ground: str = "perfect",
                       allow_large: bool = False) -> dict:
    """Per-frequency figures from the full-wave solver (arrays aligned with ``frequency``).

    With an earth lead the electrode's resistance is a lumped load where the
    lead meets the ground; a base-fed aerial gets the earth resistance in series.
    """
    seg = geometry.segments
    check_full_wave_budget(seg, frequency, allow_large)
    # the earth system's resistance at each frequency goes in series after the solve (base feed only)
    earth_f = np.broadcast_to(np.asarray(earth_ohm, float), (len(np.atleast_1d(frequency)),))
    series = 0.0
    kwargs = {}
    if ground != "perfect":
        kwargs = {"soil_permittivity": site.soil.relative_permittivity, "soil_conductivity": site.soil.conductivity_s_m}
    res = solve_full_wave(seg, np.asarray(frequency, float), ground=ground, series_ohm=series, progress=progress, **kwargs)
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
