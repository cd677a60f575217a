"""The functions the command line calls, one per command; a notebook can call them too."""

from __future__ import annotations

from aerial.core.errors import AerialError, SafetyRefusal


def check_site(path) -> dict:
    """Validate a site file and return the resolved geometry summary (JSON-ready)."""
    from aerial.estimate.assemble import frequency_grid
    from aerial.estimate.plain import finalise
    from aerial.geometry.resolve import resolve, wires_json
    from aerial.estimate.cautions import cautions_for
    from aerial.site.reader import load_site

    site = load_site(path)
    clearance_warnings = refusal_check(site)
    geo = resolve(site)
    freqs = frequency_grid(site)
    return finalise({
        "site": {"name": site.name, "file": site.path, "region": site.region, "noise_category": site.noise,
                 "soil": site.soil.name},
        "geometry": {
            "wires": wires_json(geo),
            "feed_m": [float(v) for v in geo.feed_m],
            "base_fed": geo.base_fed,
            "total_length_m": geo.total_length_m,
            "earth_lead_length_m": geo.earth_lead_length_m,
            "max_height_m": geo.max_height_m,
            "mean_height_m": geo.mean_height_m,
            "plan_extent_m": geo.plan_extent_m(),
            "segment_count": len(geo.segments),
        },
        "earth": [e.kind for e in site.electrodes],
        "bands": [{"name": n, "from_hz": lo, "to_hz": hi} for n, lo, hi in site.bands],
        "frequency_count": len(freqs),
        "stations": len(site.stations),
        "cautions": cautions_for(site),
        "warnings": list(site.notes) + clearance_warnings,
    })


def refusal_check(site) -> list[str]:
    """Refuse (raise SafetyRefusal) a site whose own wire breaks a power-line clearance.

    Returns the clearance warnings (wires outside the lot, telephone or cable crossings).
    """
    from aerial.planner.clearance import enforce_site_clearance

    try:
        report = enforce_site_clearance(site)
    except SafetyRefusal as err:  # name the file, as every other message does
        raise SafetyRefusal(f"{err} (site file {site.path})") from None
    return list(getattr(report, "warnings", []) or [])


def run_report(path, *, full_wave=False, step_hz=None, progress=None, pictures=None, force=False, ground="perfect",
               allow_large=False) -> dict:
    """Load a site (None: the built-in example), run the whole chain, optionally draw pictures.

    ``allow_large`` lets a full-wave sweep run past the memory and time budget
    (:func:`aerial.estimate.fullwave_sweep.check_full_wave_budget`).
    """
    from aerial.estimate.assemble import analyse
    from aerial.site.reader import load_site

    site = load_site(path)
    clearance_warnings = refusal_check(site)
    if pictures:
        from aerial.outputs.pictures import check_picture_folder

        check_picture_folder(pictures, force, site)
    result = analyse(site, method="full-wave" if full_wave else "closed-form", step_hz=step_hz, progress=progress,
                     ground=ground, allow_large=allow_large)
    if clearance_warnings:
        result["warnings"] = clearance_warnings + [w for w in result["warnings"] if w not in clearance_warnings]
    if pictures:
        from aerial.outputs.pictures import draw_report_pictures

        result["pictures"] = draw_report_pictures(result, pictures, force=force, protected=(site.path,))
    return result


def run_layout(path, *, best=5, full_wave=False, picture=None, force=False, allow_large=False, progress=None) -> dict:
    from aerial.site.reader import load_site

    site = load_site(path)
    try:
        from aerial.planner.search import plan_layouts
    except ImportError:
        raise AerialError("the layout planner is not available in this build") from None
    if picture:
        from aerial.outputs.files import check_writable

        check_writable(picture, force, protected=(site.path,))
    draw = None
    if picture:
        from aerial.outputs.plan_drawing import plan_picture_writer

        draw = plan_picture_writer(picture, force=force)
    return plan_layouts(site, best=best, full_wave=full_wave, draw=draw, allow_large=allow_large,
                        progress=progress)


def coil_helper(*, diameter, wire, turns=None, inductance=None, pitch=None, strands=1, frequency="1 MHz") -> dict:
    from aerial.estimate.receiver import coil_design

    return coil_design(diameter=diameter, wire=wire, turns=turns, inductance=inductance, pitch=pitch,
                       strands=strands, frequency=frequency)
