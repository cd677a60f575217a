"""Plan view and side elevation of a wire and its surroundings, as SVG text whose words stay text.

A *scene* is a plain dict of plan coordinates (metres, x east, y north, z up):
the surroundings as :func:`aerial.outputs.plan_drawing.build_scene` lists them
(lot, buildings, obstacles, supports, entry, overhead lines, fall zones) and a
list ``wires`` of ``{"label", "kind", "points"}`` with ``kind`` one of
``"aerial"`` (the chosen wire), ``"lead-in"``, ``"earth lead"``, ``"other"``
(a runner-up layout). The report's scene comes from the result's resolved
wires (:func:`report_scene`), the planner's from its ranked layouts
(:func:`layout_scene`). The drawings are made in the unit system asked for
(:func:`aerial.outputs.plan_drawing.in_units`): metres, or under "us" feet, every coordinate, axis
and length label alike.
"""

from __future__ import annotations

import textwrap

import numpy as np

from aerial.core.units import FOOT_M
from aerial.outputs.charts import PALETTE, chart_svg, new_figure, plain_label
from aerial.outputs.plan_drawing import in_units, length_label

#: Room left around the drawn things on the plan view. [m]
PLAN_MARGIN_M = 3.0

WIRE_STYLE = {
    "aerial": {"color": PALETTE["blue"], "linewidth": 2.6, "linestyle": "-"},
    "lead-in": {"color": PALETTE["blue"], "linewidth": 1.6, "linestyle": "--"},
    "earth lead": {"color": PALETTE["green"], "linewidth": 1.4, "linestyle": ":"},
    "other": {"color": PALETTE["sky"], "linewidth": 1.0, "linestyle": "-."},
}


def empty_surroundings() -> dict:
    return {"lot": None, "buildings": [], "obstacles": [], "supports": [], "entry": None, "lines": [], "zones": []}


def site_surroundings(site) -> dict:
    """The site's ``[plan]`` surroundings with each power line's fall zone for the site's own wire.

    A site without ``[plan]`` gives an empty scene.
    """
    if not site.plan:
        return empty_surroundings()
    from aerial.outputs.plan_drawing import build_scene
    from aerial.planner.clearance import fall_zone, fall_zone_distance, site_parts
    from aerial.site.plan import site_plan

    plan = site_plan(site)
    _, tallest, _ = site_parts(site)
    zones = []
    for line in plan.power_lines:
        dist = float(fall_zone_distance(tallest, line.height_m))
        zones.append((line.name, fall_zone(line.path, dist), dist))
    scene = build_scene(site, plan, [], zones)
    scene.pop("layouts", None)
    scene["supports"] = [s for s in scene["supports"] if s.get("kind") != "entry"]
    return scene


def report_scene(result, surroundings=None) -> dict:
    """A scene of the report's resolved wires (and the site's surroundings, when known)."""
    scene = dict(surroundings or empty_surroundings())
    building = result.get("building")
    if isinstance(building, dict) and building.get("footprint_m") and not scene.get("buildings"):
        # the building the figures take in ([building], or inferred), where no [plan] drew its own
        scene["buildings"] = [{"name": f"building ({building.get('construction', 'unknown')})",
                               "outline": building["footprint_m"], "height_m": building["height_m"]}]
    kinds = {"aerial": "aerial", "lead-in": "lead-in", "earth lead": "earth lead"}
    scene["wires"] = [{"label": w["name"], "kind": kinds.get(w["role"], "aerial"), "points": w["points_m"]}
                      for w in result["geometry"]["wires"]]
    feed = result["geometry"].get("feed_m")
    scene["receiver"] = feed
    scene["title"] = result["site"]["name"]
    return scene


def layout_scene(scene: dict, layouts: list) -> dict:
    """The planner's scene with its top layouts as wires: #1 is the chosen wire, #2 and #3 faint."""
    out = dict(scene)
    out.pop("layouts", None)
    wires = []
    for lay in layouts[:3]:
        first = lay["rank"] == 1
        label = "#1 (chosen)" if first else f"#{lay['rank']}"
        wires.append({"label": label, "kind": "aerial" if first else "other", "points": lay["top_points_m"]})
        if first and lay.get("lead_in_points_m"):
            wires.append({"label": "lead-in of #1", "kind": "lead-in", "points": lay["lead_in_points_m"]})
    out["wires"] = wires
    return out


def _path_middle(xs, ys):
    """The point halfway along a polyline (by length)."""
    xs, ys = np.asarray(xs, float), np.asarray(ys, float)
    seg = np.hypot(np.diff(xs), np.diff(ys))
    total = float(seg.sum())
    if total <= 0:
        return float(xs[0]), float(ys[0])
    run = np.concatenate([[0.0], np.cumsum(seg)])
    return float(np.interp(total / 2, run, xs)), float(np.interp(total / 2, run, ys))


def _occupy(ax, xy, text: str, fontsize: float, placed: list | None) -> None:
    """Add the box of a label centred on data point ``xy`` to ``placed`` (when labels are being kept apart)."""
    if placed is None:
        return
    px, py = ax.transData.transform(xy) * 72.0 / ax.figure.dpi
    lines = text.split("\n")
    w, h = 0.6 * fontsize * max(len(t) for t in lines), 1.2 * fontsize * len(lines)
    placed.append((px - w / 2, py - h / 2, px + w / 2, py + h / 2))


def _free_offset(ax, xy, text: str, offset, step: float, placed: list, fontsize: float, ha: str,
                 both_ways: bool = False) -> tuple:
    """An offset [pt] for a label at data point ``xy`` that overlaps no label in ``placed``, and its vertical anchor.

    Tried in turn: ``offset``, then moved by ``step`` [pt] at a time (with ``both_ways``, alternately below
    and above the point, nearest first). Boxes are estimated in points from the text (0.6 em a character,
    1.2 em a line), so the check holds at any resolution; the axes' limits must be set first. The chosen
    box is added to ``placed``. Returns ((dx, dy), va).
    """
    px, py = ax.transData.transform(xy) * 72.0 / ax.figure.dpi
    lines = text.split("\n")
    w = 0.6 * fontsize * max(len(t) for t in lines)
    h = 1.2 * fontsize * len(lines)
    dx, dy = offset
    x0 = px + dx - {"center": w / 2, "right": w}.get(ha, 0.0)
    tries = []
    for n in range(12):
        tries.append((dy + n * step, "top" if step < 0 else "bottom"))
        if both_ways:
            tries.append((-dy - n * step, "bottom" if step < 0 else "top"))
    for ddy, va in tries:
        y0 = py + ddy - (h if va == "top" else 0.0)
        box = (x0, y0, x0 + w, y0 + h)
        if not any(box[0] < b[2] and b[0] < box[2] and box[1] < b[3] and b[1] < box[3] for b in placed):
            break
    else:
        ddy, va = tries[0]
        y0 = py + ddy - (h if va == "top" else 0.0)
        box = (x0, y0, x0 + w, y0 + h)
    placed.append(box)
    return (dx, ddy), va


def _draw_surroundings(ax, scene, placed: list | None = None) -> None:
    """Zones, lot, buildings, obstacles, lines and supports; ``placed``: label boxes to keep clear of (plan).

    The scene is in its own unit (``scene["unit"]``, :func:`aerial.outputs.plan_drawing.in_units`); every length label says it.
    """
    unit = scene.get("unit", "m")
    from matplotlib.patches import PathPatch, Polygon as MplPolygon
    from matplotlib.path import Path as MplPath

    for z in scene.get("zones", []):
        verts, codes = [], []
        for r in z["rings"]:
            verts += r + [r[0]]
            codes += [MplPath.MOVETO] + [MplPath.LINETO] * (len(r) - 1) + [MplPath.CLOSEPOLY]
        ax.add_patch(PathPatch(MplPath(verts, codes), facecolor="none", hatch="xx", edgecolor=PALETTE["vermillion"],
                               linewidth=0.8, linestyle="--", alpha=0.6,
                               label=f"fall zone of {plain_label(z['name'])} ({length_label(z['distance_m'], unit)})"))
    if scene.get("lot"):
        ax.add_patch(MplPolygon(scene["lot"], closed=True, fill=False, edgecolor=PALETTE["grey"], linestyle="--",
                                label="lot boundary"))
    for b in scene.get("buildings", []):
        ax.add_patch(MplPolygon(b["outline"], closed=True, facecolor="#e8dcc8", edgecolor="#555555"))
        c = np.mean(np.asarray(b["outline"], float), axis=0)
        text = f"{plain_label(b['name'])}\n{length_label(b['height_m'], unit)}"
        ax.text(c[0], c[1], text, ha="center", va="center", fontsize=6.5)
        _occupy(ax, c, text, 6.5, placed)
    for o in scene.get("obstacles", []):
        ax.add_patch(MplPolygon(o["outline"], closed=True, facecolor="#dddddd", edgecolor="#555555", hatch=".."))
        c = np.mean(np.asarray(o["outline"], float), axis=0)
        text = textwrap.fill(plain_label(o["name"]), 14)
        ax.text(c[0], c[1], text, ha="center", va="center", fontsize=6.5)
        _occupy(ax, c, text, 6.5, placed)
    for ln in scene.get("lines", []):
        p = np.asarray(ln["path"], float)
        power = ln["kind"] == "power"
        ax.plot(p[:, 0], p[:, 1], color=PALETTE["vermillion"] if power else PALETTE["purple"],
                linewidth=3 if power else 1.8, linestyle="-" if power else "-.")
        mid = p[len(p) // 2] if len(p) > 2 else p.mean(axis=0)
        ax.annotate(f"{'power line' if power else 'telephone/cable'}: {plain_label(ln['name'])}, "
                    f"{length_label(ln['height_m'], unit)}",
                    xy=mid, xytext=(0, 5 if power else -11), textcoords="offset points", ha="center", fontsize=7,
                    color=PALETTE["black"], fontweight="bold" if power else "normal")
    for sp in scene.get("supports", []):
        ax.plot(sp["x"], sp["y"], marker="^", color=PALETTE["black"], markersize=6, linestyle="none")
        text = f"{plain_label(sp['name'])} {length_label(sp['height_m'], unit)}"
        # supports at one place, or close: their labels one under another; near the east edge, written leftwards
        x_lo, x_hi = ax.get_xlim()
        ha = "right" if placed is not None and sp["x"] > x_lo + 0.7 * (x_hi - x_lo) else "left"
        start = (-4 if ha == "right" else 4, -3)
        off, va = ((4, -9), "baseline") if placed is None else \
            _free_offset(ax, (sp["x"], sp["y"]), text, start, -8, placed, 6.5, ha, both_ways=True)
        ax.annotate(text, (sp["x"], sp["y"]), xytext=off, textcoords="offset points", fontsize=6.5, ha=ha, va=va)


def plan_figure(scene: dict, units: str = "si"):
    """Plan view (north up): surroundings, fall zones, and the wires with their labels (a Figure).

    ``units``: "si" (metres) or "us" (feet) for the axes and every length label.
    """
    scene = in_units(scene, units)
    unit = scene["unit"]
    pad = PLAN_MARGIN_M / (FOOT_M if unit == "ft" else 1.0)
    pts = [p[:2] for w in scene["wires"] for p in w["points"]]
    for key in ("lot",):
        pts += scene.get(key) or []
    for b in scene.get("buildings", []) + scene.get("obstacles", []):
        pts += b["outline"]
    pts += [[s["x"], s["y"]] for s in scene.get("supports", [])]
    a = np.asarray(pts, float)
    x0, y0 = a.min(axis=0) - pad
    x1, y1 = a.max(axis=0) + pad
    if (x1 - x0) < 0.5 * (y1 - y0):  # a tall thin site: widen the eastern extent so the drawing stays readable
        mid, half = (x0 + x1) / 2, 0.25 * (y1 - y0)
        x0, x1 = mid - half, mid + half
    aspect = (y1 - y0) / max(x1 - x0, 1e-6)
    plot_w = min(4.4, 4.0 / aspect)  # the plot area fits a 4.4 in x 4.0 in box, north up, metres square
    plot_h = plot_w * aspect
    if plot_h < 1.4:  # a long thin site: widen the northern extent so the drawing stays readable
        mid, half = (y0 + y1) / 2, 1.4 / plot_w * (x1 - x0) / 2
        y0, y1, plot_h = mid - half, mid + half, 1.4
    left, right, bottom, top = 0.75, 2.75, 0.55, 0.35  # margins [in]: labels, legend, axis title
    fig = new_figure(left + plot_w + right, bottom + plot_h + top, layout=None)
    W, H = fig.get_size_inches()
    ax = fig.add_axes((left / W, bottom / H, plot_w / W, plot_h / H))
    ax.set_xlim(x0, x1)  # limits first: the labels are placed clear of one another in points
    ax.set_ylim(y0, y1)
    ax.set_aspect("equal", adjustable="box")
    ax.apply_aspect()
    placed: list = []
    _draw_surroundings(ax, scene, placed)
    _draw_wires(ax, scene, plan=True, placed=placed)
    ax.set_xlabel(f"east [{unit}]")
    ax.set_ylabel(f"north [{unit}] (north is up)")
    ax.set_title("Plan view")
    handles, labels = ax.get_legend_handles_labels()
    ax.legend(handles, [textwrap.fill(t, 30) for t in labels], loc="upper left", bbox_to_anchor=(1.02, 1.0),
              fontsize=7, frameon=False)
    ax.grid(True, alpha=0.25, linewidth=0.5)
    fig.aerial_svg = ("plan", f"Plan view of {scene.get('title', 'the site')}")
    return fig


def _draw_wires(ax, scene, plan: bool, along=None, placed: list | None = None) -> None:
    labelled = set()
    for w in scene["wires"]:
        if not plan and w["kind"] == "other":
            continue  # the elevation is of the chosen wire only
        p = np.asarray(w["points"], float)
        style = WIRE_STYLE.get(w["kind"], WIRE_STYLE["aerial"])
        legend = {"aerial": "aerial wire", "lead-in": "lead-in", "earth lead": "earth lead",
                  "other": "runner-up layouts"}[w["kind"]]
        xs, ys = (p[:, 0], p[:, 1]) if plan else (along(p), p[:, 2])
        ax.plot(xs, ys, label=None if legend in labelled else legend, **style)
        labelled.add(legend)
        if w["kind"] in ("aerial", "other"):
            mid = _path_middle(xs, ys)
            text = plain_label(w["label"])
            # wires over one another: their labels stacked above, clear of every label drawn before
            off, va = ((0, 8), "baseline") if placed is None else _free_offset(ax, mid, text, (0, 4), 9, placed, 7, "center")
            ax.annotate(text, xy=mid, xytext=off, textcoords="offset points", ha="center", va=va, fontsize=7,
                        fontweight="bold" if w["kind"] == "aerial" else "normal", color=PALETTE["black"])
    rx = scene.get("receiver")
    entry = scene.get("entry")
    at = rx if rx else ([entry["x"], entry["y"], entry["height_m"]] if entry else None)
    if at is not None:
        xy = (at[0], at[1]) if plan else (float(along(np.asarray([at], float))[0]), at[2])
        ax.plot(*xy, marker="s", color=PALETTE["black"], markersize=6, linestyle="none",
                label="receiver" if rx else "lead-in entry")


def _main_direction(points: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Origin and unit direction of the plan axis along which the points spread most."""
    xy = points[:, :2]
    centre = xy.mean(axis=0)
    d = xy - centre
    if np.ptp(xy, axis=0).max() < 1e-9:
        return centre, np.array([1.0, 0.0])
    _, _, vt = np.linalg.svd(d, full_matrices=False)
    u = vt[0] / np.linalg.norm(vt[0])
    if u[0] < 0 or (abs(u[0]) < 1e-12 and u[1] < 0):
        u = -u
    s = d @ u
    return centre + u * s.min(), u


def elevation_figure(scene: dict, units: str = "si"):
    """Side elevation along the wire's main direction, with the height of every fixing point (a Figure).

    ``units``: "si" (metres) or "us" (feet) for the axes and every length label.
    """
    scene = in_units(scene, units)
    unit = scene["unit"]
    main = [w for w in scene["wires"] if w["kind"] == "aerial"] or scene["wires"]
    allp = np.asarray([p for w in main for p in w["points"]], float)
    origin, u = _main_direction(allp)

    def along(p):
        return (np.asarray(p, float)[:, :2] - origin) @ u

    fig = new_figure(7.0, 2.7, layout=None)
    ax = fig.add_axes((0.75 / 7.0, 0.55 / 2.7, (7.0 - 0.75 - 1.45) / 7.0, (2.7 - 0.55 - 0.35) / 2.7))
    _draw_wires(ax, scene, plan=False, along=along)
    shown = set()
    for w in scene["wires"]:
        if w["kind"] not in ("aerial", "lead-in"):
            continue
        p = np.asarray(w["points"], float)
        for q in (p[0], p[-1]):
            key = (round(float(along(q[None])[0]), 1), round(float(q[2]), 1))
            if key in shown:
                continue
            shown.add(key)
            ax.plot([key[0], key[0]], [0, q[2]], color=PALETTE["grey"], linewidth=0.6, linestyle=":")
            ax.annotate(length_label(q[2], unit), xy=(key[0], q[2]), xytext=(3, 3), textcoords="offset points", fontsize=7)
    ax.axhline(0, color=PALETTE["black"], linewidth=1.2)
    ax.set_ylim(bottom=min(-0.5, float(allp[:, 2].min()) - 0.5), top=float(allp[:, 2].max()) * 1.25 + 1)
    ax.set_xlabel(f"horizontal distance along the wire's main direction [{unit}]")
    ax.set_ylabel(f"height above ground [{unit}]")
    ax.set_title("Side elevation (heights of the fixing points marked)")
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=7, frameon=False)
    ax.grid(True, alpha=0.25, linewidth=0.5)
    fig.aerial_svg = ("elevation", f"Side elevation of {scene.get('title', 'the site')}")
    return fig


def plan_chart(scene: dict, units: str = "si") -> str:
    """The plan view as SVG text, lengths in metres ("si") or feet ("us")."""
    return chart_svg(plan_figure(scene, units))


def elevation_chart(scene: dict, units: str = "si") -> str:
    """The side elevation as SVG text, lengths in metres ("si") or feet ("us")."""
    return chart_svg(elevation_figure(scene, units))
