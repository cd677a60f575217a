"""Charts of a report's result dict, drawn with matplotlib into SVG text whose words stay text.

Every chart here reads only the result dict of :func:`aerial.estimate.assemble.analyse`
(no second set of figures) and returns an SVG document as a string. The SVG
keeps its words as ``<text>`` elements (matplotlib's ``svg.fonttype = "none"``),
so they can be selected, searched and read by a screen reader. Colours come from
the Okabe–Ito palette, which stays distinct under the common colour-vision
deficiencies; no meaning rests on red against green alone (line styles, marker
shapes and words carry it too). Every axis names its quantity and its unit.

Used by the shared HTML page (:mod:`aerial.outputs.page`) and by the loose SVG
files of ``aerial report --pictures`` (:mod:`aerial.outputs.pictures`).
"""

from __future__ import annotations

import contextlib
import io
import re

import numpy as np

#: Okabe & Ito (2008), "Color Universal Design": distinguishable with the common colour-vision deficiencies.
PALETTE = {"blue": "#0072B2", "orange": "#E69F00", "sky": "#56B4E9", "green": "#009E73", "yellow": "#F0E442",
           "vermillion": "#D55E00", "purple": "#CC79A7", "black": "#000000", "grey": "#777777"}

#: Marker and colour per station verdict: the shape and the printed word carry the meaning, not the colour.
VERDICT_STYLE = {"clearly heard": ("o", PALETTE["blue"]), "marginal": ("s", PALETTE["orange"]),
                 "heard with interference": ("^", PALETTE["orange"]), "swamped": ("v", PALETTE["vermillion"]),
                 "out of the tuning range": ("D", PALETTE["grey"]), "below the noise": ("P", PALETTE["vermillion"]),
                 "not heard": ("X", PALETTE["vermillion"])}

_RC = {"svg.fonttype": "none", "font.family": "sans-serif", "font.size": 9.0, "axes.titlesize": 10.0,
       "svg.image_inline": True, "text.usetex": False}


def plain_label(text) -> str:
    """A site string made safe for matplotlib: no mathtext (``$``), no leading underscore.

    >>> plain_label("$5 a _night_")
    '\\\\$5 a _night_'
    """
    text = str(text).replace("$", r"\$")
    return text[1:] if text.startswith("_") else text


def new_figure(width_in: float, height_in: float, layout: str | None = "constrained"):
    """A matplotlib Figure that belongs to no global pyplot state (safe in a library)."""
    from aerial.outputs.plan_drawing import matplotlib_config_dir

    matplotlib_config_dir()  # before matplotlib loads: no cache warnings when the home folder is read-only
    from matplotlib.figure import Figure

    return Figure(figsize=(width_in, height_in), layout=layout)


def svg_of(fig, name: str, label: str) -> str:
    """The figure as an SVG document with text kept as text, deterministic ids and an accessible name.

    ``name`` seeds the ids (so several charts can live in one HTML page without
    clashing); ``label`` becomes the picture's ``<title>`` and ``aria-label``.
    """
    import matplotlib

    from aerial.outputs.svg_canvas import measuring_svg_canvas

    buf = io.StringIO()
    canvas = fig.canvas
    with matplotlib.rc_context({**_RC, "svg.hashsalt": f"aerial-{name}"}):
        measuring_svg_canvas(fig)  # the SVG canvas savefig would take, measuring each string once per process
        try:
            _lay_out(fig)
            fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "aerial", "Title": label})
        finally:
            fig.set_canvas(canvas)
    return named_svg(buf.getvalue(), name, label)


def named_svg(text: str, name: str, label: str) -> str:
    """matplotlib's SVG text with its ids prefixed by ``name`` and ``label`` as its title and accessible name."""
    from xml.sax.saxutils import escape, quoteattr

    # ids unique across charts: matplotlib's ids come from a hash; prefix them with the chart's name
    text = re.sub(r'id="([^"]+)"', lambda m: f'id="{name}-{m.group(1)}"', text)
    text = re.sub(r'(url\(#|xlink:href="#|href="#)([^)"]+)', lambda m: f"{m.group(1)}{name}-{m.group(2)}", text)
    text = text.replace("<svg ", f'<svg role="img" aria-label={quoteattr(label)} class="chart" ', 1)
    return re.sub(r"(<svg[^>]*>)", lambda m: m.group(1) + f"\n <title>{escape(label)}</title>", text, count=1)


def _lay_out(fig) -> None:
    """Run the figure's layout engine once, as ``savefig`` would, then switch it off for the one drawing pass.

    The figure's canvas must be the SVG canvas (as in :func:`svg_of`).

    ``savefig`` with a layout engine draws the figure twice: a pass with drawing switched off (which runs
    the engine, at the SVG resolution of 72 dots an inch) and then the SVG itself. The engine alone gives
    the same positions, so the figure is drawn once.
    """
    engine = fig.get_layout_engine()
    if engine is None:
        return
    dpi = fig.dpi
    try:
        fig.dpi = fig.canvas.fixed_dpi  # the SVG canvas's 72 dots an inch, as in savefig's layout pass
        engine.execute(fig)
    finally:
        fig.dpi = dpi
    fig.set_layout_engine(None)


def _axes_style(ax) -> None:
    ax.grid(True, alpha=0.3, linewidth=0.6)


def bands_in(result):
    """(band, mask) for each band with at least two frequencies of the result's grid."""
    f = np.asarray(result["frequencies_hz"], float)
    for band in result.get("bands", []):
        m = (f >= band["from_hz"] - 1e-6) & (f <= band["to_hz"] + 1e-6)
        if m.sum() >= 2:
            yield band, m


def _range_points(result, key, band):
    """Frequencies [Hz] and (low, high) of ``ranges[key]`` at the points inside ``band``, or None."""
    ranges = result.get("ranges") or {}
    fr = ranges.get("frequencies_hz") or []
    pairs = ranges.get(key) or []
    pts = [(f, p[0], p[1]) for f, p in zip(fr, pairs)
           if p and p[0] is not None and p[1] is not None and band["from_hz"] - 1 <= f <= band["to_hz"] + 1]
    if len(pts) < 2:
        return None
    pts.sort()
    a = np.array(pts, float)
    return a[:, 0], a[:, 1], a[:, 2]


def _shade_range(ax, result, key, band, scale, label):
    pts = _range_points(result, key, band)
    if pts is None:
        return False
    f, lo, hi = pts
    ax.fill_between(f / 1e3, lo * scale, hi * scale, color=PALETTE["sky"], alpha=0.35, linewidth=0,
                    hatch="///", edgecolor=PALETTE["blue"], label=label)
    return True


#: Most bands drawn side by side, one panel each; more share one panel on a logarithmic frequency axis.
MAX_BAND_PANELS = 2


def band_panels(result) -> list[tuple[str, list, bool]]:
    """Panels of the frequency charts: (title, [(band, mask), ...], logarithmic frequency axis)."""
    bands = list(bands_in(result))
    if len(bands) <= MAX_BAND_PANELS:
        return [(plain_label(b["name"]), [(b, m)], False) for b, m in bands]
    lo, hi = min(b["from_hz"] for b, _ in bands), max(b["to_hz"] for b, _ in bands)
    return [(f"{len(bands)} bands", bands, hi / lo > 3)]


def _frequency_panel(ax, f, y, parts, log, style, result, range_key, scale, legend):
    for k, (band, m) in enumerate(parts):
        ax.plot(f[m] / 1e3, y[m] * scale, label="estimate" if k == 0 else None, **style)
        if range_key:
            _shade_range(ax, result, range_key, band, scale, "range from the stated tolerances" if k == 0 else None)
    if log:
        from matplotlib.ticker import FuncFormatter, NullFormatter

        ax.set_xscale("log")
        ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))  # plain text, no mathtext
        ax.xaxis.set_minor_formatter(NullFormatter())
    ax.set_xlabel("frequency [kHz]")
    if legend:
        ax.legend(loc="best", fontsize=7)
    _axes_style(ax)


def impedance_figure(result):
    """Series resistance and reactance at the receiver terminals across each band, tolerance range shaded.

    Returns the matplotlib Figure (None when there is nothing to draw); :func:`impedance_chart` gives its SVG.
    """
    f = np.asarray(result["frequencies_hz"], float)
    z = np.asarray(result["aerial"]["impedance_ohm"], float).reshape(len(f), 2)
    panels = band_panels(result)
    if not panels:
        return None
    fig = new_figure(3.5 * len(panels) + 0.6 if len(panels) > 1 or not panels[0][2] else 7.0, 4.4)
    axes = fig.subplots(2, len(panels), squeeze=False)
    for j, (title, parts, log) in enumerate(panels):
        _frequency_panel(axes[0, j], f, z[:, 0], parts, log, {"color": PALETTE["blue"], "linewidth": 1.8},
                         result, "series_resistance_ohm", 1.0, True)
        axes[0, j].set_ylabel("series resistance [Ω]")
        axes[0, j].set_title(title)
        _frequency_panel(axes[1, j], f, z[:, 1], parts, log, {"color": PALETTE["vermillion"], "linewidth": 1.8,
                                                               "linestyle": "--"}, result, None, 1.0, False)
        axes[1, j].set_ylabel("reactance [Ω]")
    fig.suptitle(f"Impedance at the receiver terminals ({plain_label(result['aerial']['model'].split(':')[0])})",
                 fontsize=10)
    fig.aerial_svg = ("impedance", "Impedance at the receiver terminals against frequency")
    return fig


def capacitance_figure(result):
    """Capacitance the aerial presents across each band, tolerance range shaded.

    Returns the matplotlib Figure (None when there is nothing to draw); :func:`capacitance_chart` gives its SVG.
    """
    f = np.asarray(result["frequencies_hz"], float)
    c = np.asarray(result["aerial"]["capacitance_f"], float)
    panels = band_panels(result)
    if not panels:
        return None
    fig = new_figure(3.5 * len(panels) + 0.6 if len(panels) > 1 or not panels[0][2] else 7.0, 2.6)
    axes = fig.subplots(1, len(panels), squeeze=False)
    for j, (title, parts, log) in enumerate(panels):
        _frequency_panel(axes[0, j], f, c, parts, log, {"color": PALETTE["blue"], "linewidth": 1.8}, result,
                         "capacitance_f", 1e12, True)
        axes[0, j].set_ylabel("capacitance presented [pF]")
        axes[0, j].set_title(title)
    fig.suptitle("Capacitance the aerial presents to the tuning circuit", fontsize=10)
    fig.aerial_svg = ("capacitance", "Capacitance the aerial presents against frequency")
    return fig


def tuning_figure(result):
    """Tuned frequency against the capacitor setting, the band shaded and each listed station marked.

    Returns the matplotlib Figure (None when there is nothing to draw); :func:`tuning_chart` gives its SVG.
    """
    tuning = result.get("tuning") or {}
    curve = tuning.get("range_curve") or {}
    if not curve.get("capacitor_setting_f"):
        return None
    fig = new_figure(7.0, 3.8)
    ax = fig.subplots()
    ax.plot(np.asarray(curve["capacitor_setting_f"]) * 1e12, np.asarray(curve["frequency_hz"]) / 1e3,
            color=PALETTE["blue"], linewidth=2, label="tuned frequency")
    band = tuning.get("band") or {}
    if band:
        ax.axhspan(band["from_hz"] / 1e3, band["to_hz"] / 1e3, color=PALETTE["yellow"], alpha=0.25, linewidth=0,
                   label=f"band: {plain_label(band.get('name', ''))}")
        for edge in (band["from_hz"], band["to_hz"]):
            ax.axhline(edge / 1e3, color=PALETTE["grey"], linestyle="--", linewidth=0.8)
    for s in result.get("stations") or []:
        f_khz = s["frequency_hz"] / 1e3
        ax.axhline(f_khz, color=PALETTE["purple"], linestyle=":", linewidth=0.9)
        c = s.get("capacitor_setting_f")
        if c is not None and s.get("tunable", True):
            ax.plot([c * 1e12], [f_khz], marker="o", color=PALETTE["purple"], markersize=5)
        ax.annotate(plain_label(s.get("name", "")) + ("" if s.get("tunable", True) else " (out of reach)"),
                    xy=(1.0, f_khz), xycoords=("axes fraction", "data"), xytext=(-4, 2), textcoords="offset points",
                    ha="right", va="bottom", fontsize=7, color=PALETTE["black"])
    ax.set_xlabel("capacitor setting [pF]")
    ax.set_ylabel("tuned frequency [kHz]")
    ax.set_title("Tuning range (dotted lines and dots: listed stations)")
    ax.legend(loc="upper left", fontsize=7)
    _axes_style(ax)
    fig.aerial_svg = ("tuning", "Tuned frequency against capacitor setting, with the band and the stations")
    return fig


def noise_power_at_detector(station) -> float | None:
    """Noise in the tuned bandwidth carried to the detector like the station [W], or None.

    The station's detector power divided by its signal-to-noise ratio (a field
    ratio in dB, so the power ratio is 10^(dB/10)): the aerial and the tuned
    circuit pass noise and signal at the same frequency alike.

    >>> round(noise_power_at_detector({"detector_power_w": 1e-6, "signal_to_noise_db": 30.0}), 15)
    1e-09
    """
    p, snr = station.get("detector_power_w"), station.get("signal_to_noise_db")
    if p is None or snr is None or p <= 0:
        return None
    return float(p / 10 ** (snr / 10))


def station_figure(result):
    """Power at the detector for each station against the noise floor carried with it, by day (and by night).

    Returns the matplotlib Figure (None when there is nothing to draw); :func:`station_chart` gives its SVG.
    """
    stations = [s for s in result.get("stations") or [] if s.get("detector_power_w")]
    if not stations:
        return None
    fig = new_figure(7.0, 1.5 + 0.45 * len(stations))
    ax = fig.subplots()
    y = np.arange(len(stations))[::-1]
    seen = set()

    def mark(p, noise, yi, verdict, night):
        marker, colour = VERDICT_STYLE.get(verdict, ("D", PALETTE["grey"]))
        label = f"{verdict} by night" if night else verdict
        if noise is not None:
            ax.plot([noise, p], [yi, yi], color=PALETTE["grey"], linewidth=1.0 if night else 1.5,
                    linestyle=":" if night else "-")
            ax.plot([noise], [yi], marker="|", markersize=12, color=PALETTE["black"],
                    label=None if "noise" in seen else "noise in the tuned bandwidth")
            seen.add("noise")
        ax.plot([p], [yi], marker=marker, markersize=8, linestyle="none", color=colour,
                markerfacecolor="white" if night else colour, label=None if label in seen else label)
        seen.add(label)
        ax.annotate(f" {plain_label(verdict)}{' (night)' if night else ''}", xy=(p, yi), xytext=(6, 0),
                    textcoords="offset points", va="center", fontsize=7)

    for yi, s in zip(y, stations):
        night = s.get("night") or {}
        day_y = yi + (0.17 if night.get("detector_power_w") else 0.0)
        mark(s["detector_power_w"], noise_power_at_detector(s), day_y, s.get("verdict", ""), False)
        if night.get("detector_power_w"):
            mark(night["detector_power_w"], noise_power_at_detector(night), yi - 0.17, night.get("verdict", ""), True)
    from matplotlib.ticker import EngFormatter, LogLocator, NullLocator

    ax.set_xscale("log")
    ax.xaxis.set_major_locator(LogLocator(base=10, numticks=8))
    ax.xaxis.set_major_formatter(EngFormatter(unit="W", places=0))  # "10 pW": plain text, no mathtext
    ax.xaxis.set_minor_locator(NullLocator())
    ax.set_yticks(y, [plain_label(s.get("name", "")) for s in stations])
    ax.set_ylim(-0.7, len(stations) - 0.3)
    lo, hi = ax.get_xlim()
    ax.set_xlim(lo, hi * 60)  # room for the verdict words
    ax.set_xlabel("power at the detector [W]")
    ax.set_ylabel("station")
    ax.set_title("Stations at the detector, against their noise")
    fig.legend(loc="outside lower center", ncols=3, fontsize=7, frameon=False)
    _axes_style(ax)
    fig.aerial_svg = ("stations", "Power at the detector for each station against the noise")
    return fig


def station_design_figure(result):
    """Weakest wanted station's detector power against adjacent-channel rejection, one dot per coupling and taps.

    The best design with the site's coil and capacitor is ringed, the suggestion with a standard
    capacitor marked with a diamond, the site's own parts as wired with a cross; hollow dots miss the
    interference margin. Returns None when the site lists no station in the band.
    """
    design = (result.get("tuning") or {}).get("station_design") or {}
    rows = design.get("tradeoff") or []
    if not rows:
        return None
    fig = new_figure(7.0, 4.8)
    ax = fig.subplots()
    colours = {"direct": PALETTE["blue"], "coil tap": PALETTE["purple"], "series capacitor": PALETTE["yellow"],
               "separate primary": PALETTE["grey"]}
    for arr, colour in colours.items():
        for ok in (True, False):
            pts = [r for r in rows if r["arrangement"] == arr and r["meets_margin"] == ok]
            if pts:
                ax.scatter([r["adjacent_rejection_db"] for r in pts], [r["weakest_detector_power_w"] for r in pts],
                           s=18, facecolors=colour if ok else "none", edgecolors=colour,
                           label=plain_label(arr) + ("" if ok else " (misses the margin)"))
    parts = "the assumed parts" if design.get("capacitor_assumed") else "your parts"
    wired = "as designed for the band" if design.get("detector_tap_designed") else "as wired"
    for key, marker, label in (("current", "x", f"{parts} {wired}"), ("chosen", "o", f"best with {parts}"),
                               ("suggested", "D", "suggested (standard capacitor)")):
        r = design.get(key) or {}
        if key == "chosen" and not design.get("capacitor_given", True):
            continue  # no capacitor of the site's own: the suggestion is the design
        if not r or r["weakest_detector_power_w"] <= 0 or (key != "current" and r.get("as_wired")):
            continue  # nothing to mark (out of the capacitor's reach), or the same point as "as wired"
        if marker == "x":
            ax.scatter([r["adjacent_rejection_db"]], [r["weakest_detector_power_w"]], s=60, marker="x",
                       color=PALETTE["black"], linewidths=1.5, label=label, zorder=5)
        else:
            ax.scatter([r["adjacent_rejection_db"]], [r["weakest_detector_power_w"]], s=120 if marker == "o" else 70,
                       marker=marker, facecolors="none", edgecolors=PALETTE["black"], linewidths=1.5, label=label,
                       zorder=5)
    ax.set_yscale("log")
    spacing = design.get("channel_spacing_hz", 9e3) / 1e3
    ax.set_xlabel(f"rejection {spacing:.0f} kHz away at the wanted stations' centre [dB]")
    ax.set_ylabel("weakest wanted station at the detector [W]")
    ax.set_title("Tuning for the listed stations: signal against selectivity as the taps move")
    fig.legend(loc="outside lower center", ncols=3, fontsize=7, frameon=False)  # outside the axes: it covers no point
    _axes_style(ax)
    fig.aerial_svg = ("station-design", "Weakest wanted station's detector power against adjacent-channel rejection")
    return fig


def station_design_chart(result) -> str | None:
    return _report_chart(station_design_figure, result)


def chart_svg(fig) -> str | None:
    """The SVG text of a figure made by one of the ``*_figure`` functions (None for None)."""
    return None if fig is None else svg_of(fig, *fig.aerial_svg)


#: The report charts drawn inside :func:`drawn_once`: {(figure function's name, id(result)): (result, SVG)}.
_kept: dict | None = None


@contextlib.contextmanager
def drawn_once():
    """Within the block, a report chart asked for again of the same result (the pictures, then the page) is
    the SVG text drawn the first time instead of a second drawing of it (the very same text)."""
    global _kept
    outer = _kept
    _kept = {} if outer is None else outer
    try:
        yield
    finally:
        _kept = outer


def _report_chart(figure_of, result) -> str | None:
    kept = _kept
    if kept is None:
        return chart_svg(figure_of(result))
    key = (figure_of.__name__, id(result))
    if key not in kept or kept[key][0] is not result:
        kept[key] = (result, chart_svg(figure_of(result)))
    return kept[key][1]


def impedance_chart(result) -> str:
    return _report_chart(impedance_figure, result)


def capacitance_chart(result) -> str:
    return _report_chart(capacitance_figure, result)


def tuning_chart(result) -> str | None:
    return _report_chart(tuning_figure, result)


def station_chart(result) -> str | None:
    return _report_chart(station_figure, result)
