"""A plan drawing of a site and its planned wire: SVG written as text, or PNG through matplotlib.

The drawing shows the lot, the buildings and obstacles, the candidate supports,
the overhead lines with the power lines' fall zones, the top-ranked wire (and
faintly the next two), the lead-in and the entry point, a scale bar and a north
arrow. Frame: metres, x east, y north; north is up on the page.

Files are written only through :func:`aerial.outputs.files.write_atomic` (temporary
file and rename; an existing file is replaced only with ``force``).
"""

from __future__ import annotations

import io
import math
from pathlib import Path
from xml.sax.saxutils import escape

import numpy as np

from aerial.core.errors import AerialError
from aerial.core.units import FOOT_M, length_text
from aerial.outputs.files import write_atomic

PICTURE_SUFFIXES = (".svg", ".png")
#: Drawing width in pixels (SVG user units) and margin.
WIDTH_PX = 900
MARGIN_PX = 50
#: Metres of surroundings drawn around the lot, buildings and supports.
VIEW_MARGIN_M = 8.0
UNIT_SYSTEMS = ("si", "us")

#: Okabe–Ito colours (distinct under the common colour-vision deficiencies); shapes and labels carry the meaning too.
COLOURS = {
    "lot": "#777777", "building": "#e8dcc8", "obstacle": "#dddddd", "zone": "#D55E00", "power": "#D55E00",
    "telecom": "#CC79A7", "support": "#000000", "wire": "#0072B2", "other": "#56B4E9", "lead": "#0072B2",
    "entry": "#000000",
}


def _coords(geom) -> list:
    return [[float(x), float(y)] for x, y in np.asarray(geom.coords)[:, :2]]


def build_scene(site, plan, layouts, zones) -> dict:
    """Everything the drawing shows, as plain lists of plan coordinates [m].

    Parameters
    ----------
    site : Site
    plan : Plan
    layouts : list of dict
        Ranked layouts (best first) as :func:`aerial.planner.search.plan_layouts` lists them.
    zones : list of (name, Polygon, distance_m)
        Fall zones to shade.
    """
    def rings(poly):
        return [_coords(poly.exterior)] + [_coords(r) for r in poly.interiors]

    zone_out = []
    for name, poly, dist in zones:
        parts = list(poly.geoms) if hasattr(poly, "geoms") else [poly]
        zone_out.append({"name": name, "rings": [r for p in parts for r in rings(p)], "distance_m": float(dist)})
    return {
        "title": site.name,
        "lot": _coords(plan.lot.exterior) if plan.lot is not None else None,
        "buildings": [{"name": b.name, "outline": _coords(b.outline.exterior), "height_m": b.height_m} for b in plan.buildings],
        "obstacles": [{"name": o.name, "outline": _coords(o.outline.exterior)} for o in plan.obstacles],
        "supports": [{"name": s.name, "x": s.x_m, "y": s.y_m, "height_m": s.height_m, "kind": s.kind} for s in plan.supports],
        "entry": {"x": plan.entry.x_m, "y": plan.entry.y_m, "height_m": plan.entry.height_m},
        "lines": [{"name": ln.name, "kind": ln.kind, "path": _coords(ln.path), "height_m": ln.height_m} for ln in plan.lines],
        "zones": zone_out,
        "layouts": [{"rank": lay["rank"], "description": lay["description"],
                     "top": [p[:2] for p in lay["top_points_m"]], "lead": [p[:2] for p in lay["lead_in_points_m"]]}
                    for lay in layouts],
    }


def in_units(scene: dict, units: str = "si") -> dict:
    """The scene to draw in ``units``: as it is for "si" (metres); for "us" every coordinate, height and
    distance in feet, under the same keys, with ``scene["unit"]`` saying which.

    The one conversion for the plan drawing and the page's site drawings: the keys a scene lacks stay
    absent, and a point may have two coordinates or three.

    >>> feet = in_units({"lot": [[0, 0], [3.048, 0]], "buildings": [], "obstacles": [], "supports": [],
    ...                  "entry": {"x": 0, "y": 0, "height_m": 3.048}, "lines": [], "zones": [], "layouts": []}, "us")
    >>> feet["unit"], round(feet["lot"][1][0], 9), round(feet["entry"]["height_m"], 9)
    ('ft', 10.0, 10.0)
    >>> feet = in_units({"wires": [{"label": "a", "kind": "aerial", "points": [[0, 0, 3.048]]}],
    ...                  "supports": [{"name": "pole", "x": 3.048, "y": 0, "height_m": 6.096}]}, "us")
    >>> feet["unit"], round(feet["wires"][0]["points"][0][2], 9), round(feet["supports"][0]["height_m"], 9)
    ('ft', 10.0, 20.0)
    """
    if units not in UNIT_SYSTEMS:
        raise AerialError(f"'{units}' is not a valid unit system, must be one of 'si', 'us'")
    if units == "si":
        return {**scene, "unit": "m"}
    k = 1.0 / FOOT_M

    def pts(points):
        return [[float(v) * k for v in p] for p in points]

    def scaled(item, *keys):
        return {**item, **{key: float(item[key]) * k for key in keys}}

    def each(key, convert):
        return {key: [convert(item) for item in scene[key]]} if key in scene else {}

    def one(key, convert):
        return {key: convert(scene[key])} if scene.get(key) else {}

    return {
        **scene, "unit": "ft",
        **one("lot", pts),
        **each("buildings", lambda b: {**scaled(b, "height_m"), "outline": pts(b["outline"])}),
        **each("obstacles", lambda o: {**o, "outline": pts(o["outline"])}),
        **each("supports", lambda sp: scaled(sp, "x", "y", "height_m")),
        **one("entry", lambda e: scaled(e, "x", "y", "height_m")),
        **each("lines", lambda ln: {**scaled(ln, "height_m"), "path": pts(ln["path"])}),
        **each("zones", lambda z: {**scaled(z, "distance_m"), "rings": [pts(r) for r in z["rings"]]}),
        **each("layouts", lambda lay: {**lay, "top": pts(lay["top"]), "lead": pts(lay["lead"])}),
        **each("wires", lambda w: {**w, "points": pts(w["points"])}),
        **one("receiver", lambda r: [float(v) * k for v in r]),
    }


def length_label(value: float, unit: str = "m") -> str:
    """A length of the scene (in ``unit``, "m" or "ft") as the command's text and tables write it.

    >>> length_label(12.0), length_label(18.0, "ft"), length_label(39.37, "ft")
    ('12 m', '18 ft', '39.4 ft')
    """
    if unit == "ft":
        return length_text(float(value) * FOOT_M, 3, "us")
    return length_text(float(value))


def line_label(ln: dict, zones: list, unit: str = "m") -> str:
    """What a line's label on the plan says: its name, kind, height and (power) fall-zone distance."""
    kind = "power line" if ln["kind"] == "power" else ln["kind"]
    text = f"{ln['name']} ({kind}, {length_label(ln['height_m'], unit)} high"
    text += ")" if ln["kind"] != "power" else ""
    zone = next((z for z in zones if z["name"] == ln["name"]), None)
    if zone is not None:
        text += f"): keep {length_label(zone['distance_m'], unit)} clear"
    elif ln["kind"] == "power":
        text += ")"
    return text


def label_point(path, view) -> tuple[float, float]:
    """Where on a line to put its label: the point of the line nearest the middle of the view, inside it. [m]

    >>> label_point([[-100, 0], [100, 0]], (0, -10, 40, 10))
    (20.0, 0.0)
    """
    from shapely.geometry import LineString, Point

    x0, y0, x1, y1 = view
    line = LineString(path)
    p = line.interpolate(line.project(Point(0.5 * (x0 + x1), 0.5 * (y0 + y1))))
    pad_x, pad_y = 0.05 * (x1 - x0), 0.05 * (y1 - y0)
    return (float(min(max(p.x, x0 + pad_x), x1 - pad_x)), float(min(max(p.y, y0 + pad_y), y1 - pad_y)))


def _view(scene) -> tuple[float, float, float, float]:
    pts = []
    if scene["lot"]:
        pts += scene["lot"]
    for b in scene["buildings"] + scene["obstacles"]:
        pts += b["outline"]
    pts += [[s["x"], s["y"]] for s in scene["supports"]]
    pts.append([scene["entry"]["x"], scene["entry"]["y"]])
    for lay in scene["layouts"]:
        pts += lay["top"] + lay["lead"]
    a = np.array(pts, float)
    margin = VIEW_MARGIN_M / (FOOT_M if scene.get("unit") == "ft" else 1.0)
    x0, y0 = a.min(axis=0) - margin
    x1, y1 = a.max(axis=0) + margin
    return float(x0), float(y0), float(x1), float(y1)


def nice_length(span_m: float) -> float:
    """A round scale-bar length (1, 2 or 5 x 10^k m) near a fifth of ``span_m``.

    >>> nice_length(60.0)
    10.0
    """
    target = max(span_m / 5.0, 1e-3)
    p = 10 ** math.floor(math.log10(target))
    for m in (1, 2, 5, 10):
        if m * p >= target * 0.75:
            return float(m * p)
    return float(10 * p)


def rank_spot(points, rank: int) -> tuple[float, float]:
    """Where a layout's rank number sits on its top wire: part-way along it, a different part for each rank. [m]

    The top-ranked wire has its number at the middle, the next two at a third and two thirds,
    so that layouts sharing a support do not stack their numbers.

    >>> rank_spot([[0, 0], [30, 0]], 1), rank_spot([[0, 0], [30, 0]], 2)
    ((15.0, 0.0), (10.5, 0.0))
    """
    from shapely.geometry import LineString

    fraction = {1: 0.5, 2: 0.35, 3: 0.65}.get(int(rank), 0.5)
    pts = [tuple(map(float, p[:2])) for p in points]
    if len(pts) < 2 or LineString(pts).length == 0:
        return pts[0]
    p = LineString(pts).interpolate(fraction, normalized=True)
    return float(p.x), float(p.y)


def legend_entries(scene) -> list:
    """The plan's legend, in the order drawn: each ranked layout by its number, then the symbols. (kind, label)

    >>> legend_entries({"layouts": [{"rank": 1, "description": "inverted-L"}], "lines": [], "zones": []})[:2]
    [('rank 1', '1  inverted-L (best)'), ('lead', 'lead-in (dashed)')]
    """
    out = []
    for lay in scene["layouts"]:
        best = " (best)" if lay["rank"] == 1 else ""
        out.append((f"rank {lay['rank']}", f"{lay['rank']}  {lay['description']}{best}"))
    if scene["layouts"]:
        out.append(("lead", "lead-in (dashed)"))
    kinds = {ln["kind"] for ln in scene["lines"]}
    if "power" in kinds:
        out.append(("power", "power line"))
    if scene["zones"]:
        out.append(("zone", "fall zone of the power line (for layout 1)"))
    if kinds - {"power"}:
        out.append(("telecom", "telephone/cable"))
    out += [("support", "support (height)"), ("entry", "lead-in entry")]
    return out


def svg_text(scene, units: str = "si") -> str:
    """The plan drawing as an SVG document (text), lengths in metres ("si") or feet ("us")."""
    scene = in_units(scene, units)
    u = scene["unit"]
    x0, y0, x1, y1 = _view(scene)
    s = (WIDTH_PX - 2 * MARGIN_PX) / (x1 - x0)
    entries = legend_entries(scene)
    map_bottom = MARGIN_PX + 30 + (y1 - y0) * s
    height_px = int(round(map_bottom + 60 + 18 * len(entries)))

    def X(x):
        return MARGIN_PX + (x - x0) * s

    def Y(y):
        return MARGIN_PX + 30 + (y1 - y) * s

    def pts(coords):
        return " ".join(f"{X(x):.1f},{Y(y):.1f}" for x, y in coords)

    def ring_path(rings):
        return " ".join("M " + " L ".join(f"{X(x):.1f} {Y(y):.1f}" for x, y in r) + " Z" for r in rings)

    out = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH_PX}" height="{height_px}" '
        f'viewBox="0 0 {WIDTH_PX} {height_px}" font-family="sans-serif" font-size="12">',
        f"<title>Plan: {escape(scene['title'])}</title>",
        "<defs>",
        f'<clipPath id="view"><rect x="{MARGIN_PX}" y="{MARGIN_PX + 30}" width="{(x1 - x0) * s:.1f}" '
        f'height="{(y1 - y0) * s:.1f}"/></clipPath>',
        '<marker id="arrow" viewBox="0 0 10 10" refX="5" refY="5" markerWidth="8" markerHeight="8" orient="auto">'
        '<path d="M 0 0 L 10 5 L 0 10 z" fill="black"/></marker>',
        "</defs>",
        '<rect width="100%" height="100%" fill="white"/>',
        f'<text x="{MARGIN_PX}" y="24" font-size="16" font-weight="bold">{escape(scene["title"])} — plan</text>',
        '<g clip-path="url(#view)">',
    ]
    for z in scene["zones"]:
        out.append(f'<path class="fall-zone" d="{ring_path(z["rings"])}" fill="{COLOURS["zone"]}" fill-opacity="0.15" '
                   f'stroke="{COLOURS["zone"]}" stroke-dasharray="6 4" fill-rule="evenodd">'
                   f"<title>fall zone of {escape(z['name'])}: {length_label(z['distance_m'], u)}</title></path>")
    if scene["lot"]:
        out.append(f'<polygon class="lot" points="{pts(scene["lot"])}" fill="none" stroke="{COLOURS["lot"]}" '
                   'stroke-width="2" stroke-dasharray="10 5"><title>lot boundary</title></polygon>')
    for b in scene["buildings"]:
        out.append(f'<polygon class="building" points="{pts(b["outline"])}" fill="{COLOURS["building"]}" stroke="#555">'
                   f"<title>{escape(b['name'])}, {length_label(b['height_m'], u)}</title></polygon>")
    for o in scene["obstacles"]:
        out.append(f'<polygon class="obstacle" points="{pts(o["outline"])}" fill="{COLOURS["obstacle"]}" '
                   f'stroke="#a33" stroke-dasharray="3 3"><title>{escape(o["name"])} (do not cross)</title></polygon>')
    for ln in scene["lines"]:
        col = COLOURS["power"] if ln["kind"] == "power" else COLOURS["telecom"]
        out.append(f'<polyline class="overhead-line {"power" if ln["kind"] == "power" else "telecom"}" '
                   f'points="{pts(ln["path"])}" fill="none" stroke="{col}" stroke-width="3">'
                   f"<title>{escape(ln['name'])} ({escape(ln['kind'])}, {length_label(ln['height_m'], u)})</title></polyline>")
    for ln in scene["lines"]:
        lx, ly = label_point(ln["path"], (x0, y0, x1, y1))
        col = COLOURS["power"] if ln["kind"] == "power" else COLOURS["telecom"]
        below = ln["kind"] == "power"  # power labels under their line, others over it: two lines side by side stay legible
        out.append(f'<text class="line-label" x="{X(lx):.1f}" y="{Y(ly) + (16 if below else -6):.1f}" '
                   f'text-anchor="middle" fill="{col}" '
                   f'font-weight="bold" stroke="white" stroke-width="3" paint-order="stroke">'
                   f"{escape(line_label(ln, scene['zones'], u))}</text>")
    for lay in reversed(scene["layouts"]):
        first = lay["rank"] == 1
        col = COLOURS["wire"] if first else COLOURS["other"]
        width = 3.5 if first else 1.5
        out.append(f'<polyline id="wire-{lay["rank"]}" class="aerial-wire" points="{pts(lay["top"])}" fill="none" '
                   f'stroke="{col}" stroke-width="{width}" stroke-linecap="round">'
                   f"<title>#{lay['rank']}: {escape(lay['description'])}</title></polyline>")
        out.append(f'<polyline id="lead-in-{lay["rank"]}" class="lead-in" points="{pts(lay["lead"])}" fill="none" '
                   f'stroke="{col}" stroke-width="{width * 0.6:.1f}" stroke-dasharray="5 3"/>')
    for lay in reversed(scene["layouts"]):
        rx, ry = rank_spot(lay["top"], lay["rank"])
        col = COLOURS["wire"] if lay["rank"] == 1 else COLOURS["other"]
        out.append(f'<g class="rank-number"><circle cx="{X(rx):.1f}" cy="{Y(ry):.1f}" r="8" fill="white" stroke="{col}"/>'
                   f'<text x="{X(rx):.1f}" y="{Y(ry) + 4:.1f}" text-anchor="middle" font-size="11" font-weight="bold">'
                   f'{lay["rank"]}</text></g>')
    out.append("</g>")
    for sp in scene["supports"]:
        out.append(f'<circle class="support" cx="{X(sp["x"]):.1f}" cy="{Y(sp["y"]):.1f}" r="5" fill="{COLOURS["support"]}">'
                   f"<title>{escape(sp['name'])} ({escape(sp['kind'])}, {length_label(sp['height_m'], u)})</title></circle>")
        out.append(f'<text x="{X(sp["x"]) + 7:.1f}" y="{Y(sp["y"]) - 6:.1f}">{escape(sp["name"])} {length_label(sp["height_m"], u)}</text>')
    e = scene["entry"]
    out.append(f'<rect class="entry" x="{X(e["x"]) - 5:.1f}" y="{Y(e["y"]) - 5:.1f}" width="10" height="10" '
               f'fill="{COLOURS["entry"]}"><title>lead-in entry, {length_label(e["height_m"], u)}</title></rect>')
    out.append(f'<text x="{X(e["x"]) + 7:.1f}" y="{Y(e["y"]) + 16:.1f}">entry</text>')
    # scale bar
    bar = nice_length(x1 - x0)
    bx, by = MARGIN_PX, map_bottom + 24
    out.append(f'<g class="scale-bar"><line x1="{bx}" y1="{by:.1f}" x2="{bx + bar * s:.1f}" y2="{by:.1f}" stroke="black" '
               f'stroke-width="3"/><text x="{bx + bar * s + 6:.1f}" y="{by + 4:.1f}">{bar:g} {u}</text></g>')
    # north arrow
    nx, ny = WIDTH_PX - MARGIN_PX, MARGIN_PX + 70
    out.append(f'<g class="north-arrow"><line x1="{nx}" y1="{ny}" x2="{nx}" y2="{ny - 36}" stroke="black" '
               f'stroke-width="2" marker-end="url(#arrow)"/><text x="{nx - 4}" y="{ny + 16}" font-weight="bold">N</text></g>')
    out.append(f'<g class="legend">{"".join(_svg_legend(entries, MARGIN_PX, by + 30))}</g>')
    out.append("</svg>")
    return "\n".join(out) + "\n"


def _svg_legend(entries, x, y) -> list:
    """SVG pieces for :func:`legend_entries`, one row of 18 px each from ``y`` down."""
    out = []
    for n, (kind, label) in enumerate(entries):
        ly = y + 18 * n
        if kind.startswith("rank ") or kind in ("lead", "power", "telecom"):
            first = kind in ("rank 1", "lead")
            col = {"power": COLOURS["power"], "telecom": COLOURS["telecom"]}.get(
                kind, COLOURS["wire"] if first else COLOURS["other"])
            dash = ' stroke-dasharray="5 3"' if kind == "lead" else ""
            out.append(f'<line x1="{x}" y1="{ly - 4}" x2="{x + 24}" y2="{ly - 4}" stroke="{col}" '
                       f'stroke-width="{3 if kind in ("rank 1", "power", "telecom") else 1.5}"{dash}/>')
        elif kind == "zone":
            out.append(f'<rect x="{x}" y="{ly - 10}" width="24" height="12" fill="{COLOURS["zone"]}" fill-opacity="0.15" '
                       f'stroke="{COLOURS["zone"]}" stroke-dasharray="6 4"/>')
        elif kind == "support":
            out.append(f'<circle cx="{x + 12}" cy="{ly - 4}" r="5" fill="{COLOURS["support"]}"/>')
        else:
            out.append(f'<rect x="{x + 7}" y="{ly - 9}" width="10" height="10" fill="{COLOURS["entry"]}"/>')
        out.append(f'<text x="{x + 32}" y="{ly}">{escape(label)}</text>')
    return out


def matplotlib_config_dir() -> None:
    """Give matplotlib a temporary configuration folder when the home folder cannot be written.

    Otherwise it prints cache warnings on stderr. A folder the user chose (MPLCONFIGDIR) is kept.
    """
    import atexit
    import os
    import shutil
    import tempfile
    from pathlib import Path

    if os.environ.get("MPLCONFIGDIR"):
        return
    base = os.environ.get("XDG_CONFIG_HOME") or os.path.join(os.path.expanduser("~"), ".config")
    try:  # what matplotlib itself would make; os.access cannot tell (root passes it everywhere)
        config = Path(base) / "matplotlib"
        config.mkdir(parents=True, exist_ok=True)
        with tempfile.TemporaryFile(dir=config):
            return
    except OSError:
        pass
    folder = tempfile.mkdtemp(prefix="aerial-matplotlib-")
    atexit.register(shutil.rmtree, folder, True)
    os.environ["MPLCONFIGDIR"] = folder


def png_bytes(scene, units: str = "si") -> bytes:
    """The plan drawing as PNG bytes (matplotlib, Agg backend, no global pyplot state), in metres or feet."""
    scene = in_units(scene, units)
    u = scene["unit"]
    matplotlib_config_dir()
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure
    from matplotlib.patches import PathPatch, Polygon as MplPolygon
    from matplotlib.path import Path as MplPath

    x0, y0, x1, y1 = _view(scene)
    entries = legend_entries(scene)
    fig = Figure(figsize=(9, 9 * (y1 - y0) / (x1 - x0) + 0.6 + 0.2 * len(entries)), dpi=100, layout="constrained")
    FigureCanvasAgg(fig)
    ax = fig.add_subplot(111)
    for z in scene["zones"]:
        verts, codes = [], []
        for r in z["rings"]:
            verts += r + [r[0]]
            codes += [MplPath.MOVETO] + [MplPath.LINETO] * (len(r) - 1) + [MplPath.CLOSEPOLY]
        ax.add_patch(PathPatch(MplPath(verts, codes), facecolor=COLOURS["zone"], alpha=0.15,
                               edgecolor=COLOURS["zone"], linestyle="--"))
    if scene["lot"]:
        ax.add_patch(MplPolygon(scene["lot"], closed=True, fill=False, edgecolor=COLOURS["lot"], linestyle="--"))
    for b in scene["buildings"]:
        ax.add_patch(MplPolygon(b["outline"], closed=True, facecolor=COLOURS["building"], edgecolor="#555"))
    for o in scene["obstacles"]:
        ax.add_patch(MplPolygon(o["outline"], closed=True, facecolor=COLOURS["obstacle"], edgecolor="#a33"))
    for ln in scene["lines"]:
        p = np.array(ln["path"])
        col = COLOURS["power"] if ln["kind"] == "power" else COLOURS["telecom"]
        ax.plot(p[:, 0], p[:, 1], color=col, lw=2.5)
        lx, ly = label_point(ln["path"], (x0, y0, x1, y1))
        ax.text(lx, ly, line_label(ln, scene["zones"], u), color=col, fontsize=8, fontweight="bold", ha="center",
                va="top" if ln["kind"] == "power" else "bottom", bbox={"facecolor": "white", "edgecolor": "none", "alpha": 0.8, "pad": 1})
    for lay in reversed(scene["layouts"]):
        first = lay["rank"] == 1
        t, ld = np.array(lay["top"]), np.array(lay["lead"])
        col = COLOURS["wire"] if first else COLOURS["other"]
        ax.plot(t[:, 0], t[:, 1], color=col, lw=3 if first else 1.2)
        ax.plot(ld[:, 0], ld[:, 1], color=col, lw=1.8 if first else 0.8, linestyle="--")
        ax.text(*rank_spot(lay["top"], lay["rank"]), str(lay["rank"]), ha="center", va="center", fontsize=8,
                fontweight="bold", zorder=5, bbox={"boxstyle": "circle,pad=0.25", "facecolor": "white", "edgecolor": col})
    for sp in scene["supports"]:
        ax.plot(sp["x"], sp["y"], "o", color=COLOURS["support"])
        ax.annotate(f"{sp['name']} {length_label(sp['height_m'], u)}", (sp["x"], sp["y"]), xytext=(4, 4),
                    textcoords="offset points", fontsize=8)
    e = scene["entry"]
    ax.plot(e["x"], e["y"], "s", color=COLOURS["entry"])
    bar = nice_length(x1 - x0)
    ax.plot([x0 + 1, x0 + 1 + bar], [y0 + 1, y0 + 1], color="black", lw=3)
    ax.text(x0 + 1 + bar, y0 + 1, f" {bar:g} {u}", va="center")
    k = 1.0 / FOOT_M if u == "ft" else 1.0  # the arrow's offsets are set in metres
    ax.annotate("N", xy=(x1 - 2 * k, y1 - 2 * k), xytext=(x1 - 2 * k, y1 - 8 * k), ha="center",
                arrowprops={"arrowstyle": "->"}, fontweight="bold")
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_aspect("equal")
    ax.set_xlabel(f"east [{u}]")
    ax.set_ylabel(f"north [{u}]")
    ax.set_title(f"{scene['title']} — plan")
    fig.legend(handles=_png_legend(entries), loc="outside lower left", fontsize=8, frameon=False,
               title="layouts by rank (the number on each wire)" if scene["layouts"] else None,
               title_fontsize=8, alignment="left")
    buf = io.BytesIO()
    fig.savefig(buf, format="png")
    return buf.getvalue()


def _png_legend(entries) -> list:
    """matplotlib legend handles for :func:`legend_entries`."""
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    def line(col, **kw):
        return Line2D([], [], color=col, **kw)

    styles = {"lead": lambda: line(COLOURS["lead"], lw=1.8, linestyle="--"),
              "power": lambda: line(COLOURS["power"], lw=2.5),
              "zone": lambda: Patch(facecolor=COLOURS["zone"], alpha=0.15, edgecolor=COLOURS["zone"], linestyle="--"),
              "telecom": lambda: line(COLOURS["telecom"], lw=2.5),
              "support": lambda: line(COLOURS["support"], marker="o", linestyle="none"),
              "entry": lambda: line(COLOURS["entry"], marker="s", linestyle="none")}
    handles = []
    for kind, label in entries:
        if kind.startswith("rank "):
            first = kind == "rank 1"
            handle = line(COLOURS["wire"] if first else COLOURS["other"], lw=3 if first else 1.2)
        else:
            handle = styles[kind]()
        handle.set_label(label)
        handles.append(handle)
    return handles


def picture_type(path) -> str:
    """The picture type a file name asks for (".svg" or ".png"), or an error naming the choices."""
    suffix = Path(path).suffix.lower()
    if suffix not in PICTURE_SUFFIXES:
        raise AerialError(f"{path}: '{suffix or '(none)'}' is not a valid picture type, must be one of "
                          + ", ".join(f"'{s}'" for s in PICTURE_SUFFIXES))
    return suffix


def write_plan_picture(path, scene, force: bool = False, protected=(), units: str = "si") -> Path:
    """Write the drawing to ``path`` (SVG or PNG by its extension) through a temporary file and a rename."""
    suffix = picture_type(path)
    from aerial.outputs.files import check_writable

    check_writable(path, force, protected)
    data = svg_text(scene, units) if suffix == ".svg" else png_bytes(scene, units)
    return write_atomic(path, data, force=force, protected=protected)


def plan_picture_writer(path, force: bool = False, protected=(), units: str = "si"):
    """A ``draw`` callable for :func:`aerial.planner.search.plan_layouts` that writes the plan to ``path``.

    The returned function builds the scene and writes it with :func:`write_plan_picture`,
    returning the path written as a string.
    """
    def draw(site, plan, layouts, zones) -> str:
        keep = tuple(protected) + ((site.path,) if getattr(site, "path", None) else ())
        return str(write_plan_picture(path, build_scene(site, plan, layouts, zones), force=force, protected=keep,
                                      units=units))

    return draw
