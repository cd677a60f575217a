"""Pictures for ``aerial report --pictures DIR``: impedance and capacitance across each band, tuning range, stations.

Drawn by :mod:`aerial.outputs.charts` into SVG text (words kept as text), then written through
:func:`aerial.outputs.files.write_atomic` (temporary file and rename; never over an
existing file without ``force``).
"""

from __future__ import annotations

from pathlib import Path

from aerial.core.errors import AerialError, os_error_words
from aerial.outputs.files import check_writable, write_atomic

PICTURE_NAMES = ("aerial-impedance.svg", "aerial-capacitance.svg", "tuning-range.svg", "station-power.svg",
                 "station-tuning.svg")


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


def draw_report_pictures(result: dict, folder, force: bool = False, protected=()) -> list[str]:
    """Draw the report's pictures into ``folder``; return the paths written.

    The same charts as the shared page (:mod:`aerial.outputs.charts`): text
    kept as text, ranges shaded, stations marked. A chart with nothing to
    show (no tuning range, no station) is left out.
    """
    from aerial.outputs import charts

    d = Path(folder)
    makers = (charts.impedance_chart, charts.capacitance_chart, charts.tuning_chart, charts.station_chart,
              charts.station_design_chart)
    drawn = [(name, make(result)) for name, make in zip(PICTURE_NAMES, makers)]  # all drawn before any is written
    return _write_pictures(d, [(name, text) for name, text in drawn if text], force, protected)


def _write_pictures(d: Path, drawn, force: bool, protected) -> list[str]:
    """Write the drawn pictures into ``d``, making the folder only now; a folder made here and left
    empty by a failure or an interrupt is removed again."""
    made = False
    try:
        d.mkdir(parents=False, exist_ok=False)
        made = True
    except FileExistsError:
        pass
    except OSError as err:
        raise AerialError(f"--pictures {d}: cannot make the folder ({os_error_words(err)})") from None
    try:
        return [str(write_atomic(d / name, text, force, protected)) for name, text in drawn]
    except BaseException:
        if made:
            try:
                d.rmdir()  # only when empty
            except OSError:
                pass
        raise
