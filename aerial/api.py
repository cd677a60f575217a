"""The functions the command line calls, one per command; a notebook can call them too."""

from __future__ import annotations

from aerial.core.errors import AerialError, SafetyRefusal, naming_the_file


def check_site(path) -> dict:
    """Validate a site file and return the resolved geometry summary (JSON-ready)."""
    from aerial.estimate.assemble import frequency_grid
    from aerial.estimate.plain import finalise
    from aerial.geometry.resolve import resolve, wires_json
    from aerial.estimate.cautions import cautions_for
    from aerial.site.reader import load_site

    site = load_site(path)  # reads [plan] and [building] too: a misspelt key or a bad corner is found here
    clearance_warnings = refusal_check(site)
    with naming_the_file(site):
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
    except SafetyRefusal as err:  # name the file, as every other message does (the exact lengths kept)
        raise SafetyRefusal(f"{site.path}: " + (err.args[0] if err.args else str(err))) from None
    return list(getattr(report, "warnings", []) or [])


def run_report(path, *, full_wave=False, step_hz=None, progress=None, pictures=None, force=False, ground="perfect",
               allow_large=False, page=None, units="si", page_units=None, beside=False) -> dict:
    """Load a site (None: the built-in example), run the whole chain, optionally draw pictures and a page.

    ``units`` ("si" or "us"): the what-if steps are round figures of that system, and the page's drawings
    are in it unless ``page_units`` says otherwise; every figure stays SI. ``beside``: the ranges and the what-if
    table worked out on the second core (:func:`aerial.estimate.assemble.analyse`); the result is the same.

    ``allow_large`` lets a full-wave sweep run past the memory and time budget
    (:func:`aerial.estimate.fullwave_sweep.check_full_wave_budget`). ``page``
    names an HTML file to write the shareable page to
    (:func:`aerial.outputs.page_report.report_page`); its path comes back as
    ``result["page"]``.
    """
    from aerial.estimate.assemble import analyse
    from aerial.site.reader import load_site

    site = load_site(path)
    clearance_warnings = refusal_check(site)
    if pictures:
        from aerial.outputs.pictures import check_picture_folder

        check_picture_folder(pictures, force, site)
    if page:
        check_page_file(page, force, site)
    result = analyse(site, method="full-wave" if full_wave else "closed-form", step_hz=step_hz, progress=progress,
                     ground=ground, allow_large=allow_large, units=units, beside=beside)
    if clearance_warnings:
        result["warnings"] = clearance_warnings + [w for w in result["warnings"] if w not in clearance_warnings]
    if pictures or page:
        from aerial.outputs.charts import drawn_once

        with drawn_once():  # the pictures and the page share their charts: each drawn once
            _draw_outputs(result, site, pictures, page, force, page_units or units)
    return result


def _draw_outputs(result, site, pictures, page, force, page_units) -> None:
    """The report's pictures and page, when asked for (their paths go into the result)."""
    if pictures:
        from aerial.outputs.pictures import draw_report_pictures

        result["pictures"] = draw_report_pictures(result, pictures, force=force, protected=(site.path,))
    if page:
        from aerial.outputs.files import write_atomic
        from aerial.outputs.page_report import report_page
        from aerial.outputs.site_drawings import site_surroundings

        text = report_page(result, site_surroundings(site), page_units)
        result["page"] = str(write_atomic(page, text, force=force, protected=(site.path,)))


def check_page_file(page, force, site) -> None:
    """Fail early (before any computing) if the page cannot be written: an .html name, free or ``force``."""
    from pathlib import Path

    from aerial.outputs.files import check_writable

    suffix = Path(page).suffix.lower()
    if suffix not in (".html", ".htm"):
        raise AerialError(f"--page {page}: expected a file name ending in .html")
    check_writable(page, force, protected=(site.path,))


def run_layout(path, *, best=5, full_wave=False, picture=None, force=False, allow_large=False, progress=None,
               page=None, units="si") -> dict:
    """Search the site's supports for the best safe layouts; optionally draw the plan and write the page.

    ``page`` names an HTML file for the shareable page
    (:func:`aerial.outputs.page_layout.layout_page`); its path comes back as ``result["page"]``.
    ``units`` ("si" or "us") sets the lengths on the plan drawing and the page's drawings; the result itself
    stays SI.
    """
    from aerial.site.reader import load_site

    site = load_site(path)
    try:
        from aerial.planner.search import plan_layouts
    except ImportError:
        raise AerialError("the layout planner is not available in this build") from None
    if picture:
        from aerial.outputs.files import check_writable
        from aerial.outputs.plan_drawing import picture_type

        picture_type(picture)  # before the search, not after it
        check_writable(picture, force, protected=(site.path,))
    if page:
        check_page_file(page, force, site)
    writer = None
    if picture:
        from aerial.outputs.plan_drawing import plan_picture_writer

        writer = plan_picture_writer(picture, force=force, units=units)
    seen = {}

    def draw(site_, plan, layouts, zones):
        from aerial.outputs.plan_drawing import build_scene

        seen["scene"] = build_scene(site_, plan, layouts, zones)
        return writer(site_, plan, layouts, zones) if writer else None

    result = plan_layouts(site, best=best, full_wave=full_wave, draw=draw if (picture or page) else None,
                          allow_large=allow_large, progress=progress)
    if page:
        from aerial.outputs.files import write_atomic
        from aerial.outputs.page_layout import layout_page

        text = layout_page(result, seen.get("scene"), units)
        result["page"] = str(write_atomic(page, text, force=force, protected=(site.path,)))
    return result


def coil_helper(*, diameter, wire, turns=None, inductance=None, pitch=None, strands=1, frequency="1 MHz",
                strand_size=None) -> dict:
    from aerial.estimate.receiver import coil_design

    return coil_design(diameter=diameter, wire=wire, turns=turns, inductance=inductance, pitch=pitch,
                       strands=strands, frequency=frequency, strand_size=strand_size)
