"""Run the method-of-moments solver for a site and shape its result like the closed-form one."""

from __future__ import annotations

import numpy as np

from aerial.models.capacitance import electrostatic_solution
from aerial.models.fullwave import solve_full_wave
from aerial.models.shapes import classify

GROUNDS = ("perfect", "lossy")


def full_wave_response(site, geometry, frequency, earth_ohm: float, progress=None, ground: str = "perfect") -> dict:
    """Per-frequency figures from the full-wave solver (arrays aligned with ``frequency``).

    With an earth lead the electrode's resistance is a lumped load where the
    lead meets the ground; a base-fed aerial gets the earth resistance in series.
    """
    seg = geometry.segments
    series = 0.0 if not geometry.base_fed else float(earth_ohm)
    kwargs = {}
    if ground == "lossy":
        kwargs = {"soil_permittivity": site.soil.relative_permittivity, "soil_conductivity": site.soil.conductivity_s_m}
    res = solve_full_wave(seg, np.asarray(frequency, float), ground=ground, series_ohm=series, progress=progress, **kwargs)
    z = np.asarray(res.impedance, complex)
    x = z.imag
    warnings = list(res.warnings)
    static = electrostatic_solution(seg)
    c_static = float(static.capacitance_f)
    cap = np.where(res.capacitive, res.capacitance, c_static)
    if not np.all(res.capacitive):
        f_bad = np.asarray(frequency)[~np.asarray(res.capacitive)]
        warnings.append(f"the aerial is inductive (past its first resonance) from {f_bad.min() / 1e3:.0f} kHz: "
                        "'capacitance presented' there shows the static value; use the reactance instead")
    rg = np.asarray(res.electrode_loss_resistance, float) + float(res.series_resistance) + np.asarray(res.ground_loss_resistance, float)
    treatment = ("perfect ground by images" if ground == "perfect" else
                 "lossy ground by the reflection-coefficient approximation")
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
