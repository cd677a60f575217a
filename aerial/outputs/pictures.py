"""Pictures for ``aerial report --pictures DIR``: impedance and capacitance across each band, tuning range.

Drawn with matplotlib's Agg backend into SVG text, then written through
:func:`aerial.outputs.files.write_atomic` (temporary file and rename; never over an
existing file without ``force``).
"""

from __future__ import annotations

import io
from pathlib import Path

import numpy as np

from aerial.core.errors import AerialError
from aerial.outputs.files import check_writable, write_atomic

PICTURE_NAMES = ("aerial-impedance.svg", "aerial-capacitance.svg", "tuning-range.svg")


def check_picture_folder(folder, force: bool, site=None) -> None:
    """Fail early (before any computing) if the pictures cannot be written."""
    d = Path(folder)
    if d.exists() and not d.is_dir():
        raise AerialError(f"--pictures {folder}: is a file; expected a folder")
    if not d.exists():
        parent = d.parent if str(d.parent) else Path(".")
        if not parent.exists():
            raise AerialError(f"--pictures {folder}: the folder {parent} does not exist")
        return
    for name in PICTURE_NAMES:
        check_writable(d / name, force)


def _figure():
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    plt.rcParams["svg.hashsalt"] = "aerial"  # deterministic SVG ids
    return plt


def _svg(fig) -> str:
    buf = io.StringIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": "aerial"})
    return buf.getvalue()


def _bands(result):
    f = np.asarray(result["frequencies_hz"], float)
    for band in result["bands"]:
        m = (f >= band["from_hz"] - 1e-6) & (f <= band["to_hz"] + 1e-6)
        if m.sum() >= 2:
            yield band, m


def draw_report_pictures(result: dict, folder, force: bool = False, protected=()) -> list[str]:
    """Draw the report's pictures into ``folder``; return the paths written."""
    plt = _figure()
    d = Path(folder)
    d.mkdir(parents=False, exist_ok=True)
    f = np.asarray(result["frequencies_hz"], float)
    a = result["aerial"]
    z = np.asarray(a["impedance_ohm"], float)
    c = np.asarray(a["capacitance_f"], float)
    bands = list(_bands(result))
    drawn: list[tuple[str, str]] = []  # draw every picture first, then write them in quick succession

    fig, axes = plt.subplots(2, max(1, len(bands)), figsize=(5 * max(1, len(bands)), 6), squeeze=False)
    for j, (band, m) in enumerate(bands):
        ax = axes[0, j]
        ax.plot(f[m] / 1e3, z[m, 0], color="tab:red")
        ax.set_ylabel("series resistance [Ω]")
        ax.set_title(band["name"])
        ax.grid(True, alpha=0.3)
        ax = axes[1, j]
        ax.plot(f[m] / 1e3, z[m, 1], color="tab:blue")
        ax.set_ylabel("reactance [Ω]")
        ax.set_xlabel("frequency [kHz]")
        ax.grid(True, alpha=0.3)
    fig.suptitle(f"{result['site']['name']}: impedance at the receiver ({a['model'].split(':')[0]})")
    fig.tight_layout()
    drawn.append((PICTURE_NAMES[0], _svg(fig)))
    plt.close(fig)

    fig, axes = plt.subplots(1, max(1, len(bands)), figsize=(5 * max(1, len(bands)), 3.5), squeeze=False)
    for j, (band, m) in enumerate(bands):
        ax = axes[0, j]
        ax.plot(f[m] / 1e3, c[m] * 1e12, color="tab:green")
        ax.set_xlabel("frequency [kHz]")
        ax.set_ylabel("capacitance presented [pF]")
        ax.set_title(band["name"])
        ax.grid(True, alpha=0.3)
    fig.suptitle("Capacitance the aerial presents to the tuning circuit")
    fig.tight_layout()
    drawn.append((PICTURE_NAMES[1], _svg(fig)))
    plt.close(fig)

    curve = (result.get("tuning") or {}).get("range_curve")
    if curve and curve.get("capacitor_setting_f"):
        fig, ax = plt.subplots(figsize=(6, 4))
        ax.plot(np.asarray(curve["capacitor_setting_f"]) * 1e12, np.asarray(curve["frequency_hz"]) / 1e3, color="tab:purple")
        tuned = (result.get("tuning") or {}).get("band") or {}
        bands = [tuned] if tuned else result["bands"]
        for band in bands:
            for edge in (band["from_hz"], band["to_hz"]):
                ax.axhline(edge / 1e3, color="grey", linestyle="--", linewidth=0.8)
        ax.set_xlabel("capacitor setting [pF]")
        ax.set_ylabel("tuned frequency [kHz]")
        ax.set_title(f"Tuning range{' for ' + tuned['name'] if tuned else ''} (dashed: band edges)")
        ax.grid(True, alpha=0.3)
        fig.tight_layout()
        drawn.append((PICTURE_NAMES[2], _svg(fig)))
        plt.close(fig)
    return [str(write_atomic(d / name, text, force, protected)) for name, text in drawn]
