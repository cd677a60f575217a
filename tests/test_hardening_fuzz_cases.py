"""Faults the site fuzzer found, each seen through the command line: one line, exit 2, never a traceback.

Every site here is invented input-handling data (the shipped balcony example, edited).
"""

from __future__ import annotations

import numpy as np
import pytest

from aerial.cli import EXIT_USER
from aerial.core.errors import ModelInputError

from .conftest import MINIMAL, ROOT, one_line, run

BALCONY = ROOT / "site_examples" / "balcony_water_pipe.toml"
HUGE = "9" * 500


def _balcony(tmp_path, old, new):
    text = BALCONY.read_text(encoding="utf-8")
    assert old in text
    p = tmp_path / "site.toml"
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    return p


@pytest.mark.parametrize("command", ["check", "report", "layout"])
def test_huge_integer_bearing_names_file_key_and_range(capsys, tmp_path, command):
    p = _balcony(tmp_path, 'distance = "18 km"', f'distance = "18 km"\nbearing = {HUGE}')
    code, out, err = run(capsys, command, p)
    assert code == EXIT_USER and out == ""
    line = one_line(err)
    assert str(p) in line and "stations[0].bearing = 999" in line and "from -360 to 360" in line


@pytest.mark.parametrize("key, extra", [
    ("site.latitude", 'longitude = 0.1'),
    ("site.longitude", 'latitude = 51.5'),
    ("site.sea_bearing", 'distance_to_sea = "20 km"'),
    ("site.atmospheric_noise", ""),
    ("site.utc_offset", ""),
])
def test_huge_integer_at_every_angle_and_level_key(capsys, write_site, key, extra):
    name = key.split(".")[1]
    p = write_site(MINIMAL.replace('name = "test vertical"', f'name = "test vertical"\n{name} = -{HUGE}\n{extra}'))
    code, out, err = run(capsys, "check", p)
    assert code == EXIT_USER and out == ""
    line = one_line(err)
    assert str(p) in line and f"{key} = -999" in line and "expected" in line


def test_overlapping_pieces_are_a_model_input_error_not_a_singular_matrix():
    from aerial.models.capacitance import electrostatic_solution
    from aerial.models.segments import Segments

    from aerial.models.segments import polyline_segments

    one = polyline_segments([[0, 0, 0.5], [0, 0, 10], [6, 0, 10]], 1e-3)
    segs = Segments(np.concatenate([one.start, one.start]), np.concatenate([one.end, one.end]),
                    np.concatenate([one.radius, one.radius]), np.concatenate([one.grounded, one.grounded]),
                    one.feed)  # the same wire drawn twice
    with pytest.raises(ModelInputError, match="on top of each other"):
        electrostatic_solution(segs)


@pytest.mark.parametrize("old, new", [
    # the entry stacked onto the west rail end (fuzz seed 1, case 2659)
    ("at = [0.3, 0.0]                # the balcony door frame", "at = [0.3, 1.5]"),
    # a support stacked onto the water pipe's point inside the flat (case 2097)
    ("at = [6.0, 1.5]\nheight = \"9.9 m\"", "at = [0.3, -1.0]\nheight = \"9.9 m\""),
])
def test_layout_skips_candidates_whose_wires_overlap(capsys, tmp_path, old, new):
    p = _balcony(tmp_path, old, new)
    code, out, err = run(capsys, "layout", p, "--json")
    assert code in (0, EXIT_USER), err
    assert "Traceback" not in err and "internal error" not in err and "Singular" not in err
    if code == EXIT_USER:
        assert str(p) in one_line(err)


def test_lead_in_inside_the_flat_has_its_lower_range_too(capsys, tmp_path):
    # the lead-in runs inside the flat at ceiling height to a receiver 0.1 m lower (fuzz seed 1, case 3658):
    # lowering the supports by their tolerance must not fold it back along the earth lead
    p = _balcony(tmp_path, "via = [[0.3, 0.0, 9.9]]", "via = [[0.3, -1, 9.9]]")
    code, out, err = run(capsys, "report", p, "--json")
    assert code == 0, err
    import json

    assert json.loads(out)["ranges"]


def test_a_model_complaint_names_the_site_file():
    from aerial.core.errors import naming_the_file

    class _Site:
        path = "flat.toml"

    with pytest.raises(ModelInputError, match=r"^flat\.toml: the electrostatic solution gave no positive"):
        with naming_the_file(_Site()):
            raise ModelInputError("the electrostatic solution gave no positive capacitance")


@pytest.mark.parametrize("argv, words", [
    (["reprot"], "aerial: argument COMMAND: invalid choice: 'reprot'"),
    (["report", "--width", "x"], "aerial: report: argument --width"),
])
def test_argument_errors_carry_one_prefix(capsys, argv, words):
    code, out, err = run(capsys, *argv)
    assert code == EXIT_USER and out == ""
    line = one_line(err)
    assert line.startswith(words) and "aerial: aerial" not in line and "aerial: aerial report" not in line


@pytest.mark.parametrize("argv, suggestion", [
    (["reprot"], 'did you mean "report"?'),
    (["layuot"], 'did you mean "layout"?'),
    (["report", "--units", "US"], 'did you mean "us"?'),
    (["xyz"], None),
])
def test_a_mistyped_choice_gets_the_closest_one(capsys, argv, suggestion):
    code, out, err = run(capsys, *argv)
    line = one_line(err)
    assert code == EXIT_USER and out == "" and "invalid choice" in line
    assert (suggestion in line) if suggestion else ("did you mean" not in line)


def test_a_model_complaint_reads_the_same_from_the_library_and_the_command_line(capsys, monkeypatch, write_site):
    """A notebook calling aerial.analyse gets the command line's message, the site file named (input handling).

    The capacitance solver is made to complain as it does on two wire pieces on one spot (fuzz cases 2097, 2659).
    """
    import aerial
    from aerial.models import closed_form

    def complain(*args, **kwargs):
        raise ModelInputError("two wire pieces lie on top of each other near (0.00, 0.00, 5.00) m")

    monkeypatch.setattr(closed_form, "electrostatic_solution", complain)
    p = write_site(MINIMAL)
    code, out, err = run(capsys, "report", p)
    assert code == EXIT_USER and out == ""
    line = one_line(err)
    with pytest.raises(ModelInputError) as caught:
        aerial.analyse(aerial.load_site(p))
    assert line == f"aerial: {caught.value}"
    assert str(caught.value) == f"{p}: two wire pieces lie on top of each other near (0.00, 0.00, 5.00) m"
