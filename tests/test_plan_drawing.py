"""The plan drawing: valid SVG (parsed with the standard library's XML parser), the wire in it, safe writes.

Uses the invented example lot in site_examples/.
"""

import xml.etree.ElementTree as ET

import pytest

from aerial.cli import EXIT_OK, EXIT_USER, main
from aerial.core.errors import AerialError
from aerial.site.plan import parse_plan
from aerial.outputs.plan_drawing import build_scene, nice_length, plan_picture_writer, svg_text, write_plan_picture
from aerial.planner.search import plan_layouts
from aerial.site.reader import load_site

from .conftest import ROOT

EXAMPLE = ROOT / "site_examples" / "suburban_lot_service_line.toml"
SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def scene():
    site = load_site(EXAMPLE)
    result = plan_layouts(site, best=3)
    return build_scene(site, parse_plan(site), result["layouts"], [])


def test_picture_is_valid_svg_with_the_wire(tmp_path):
    out = tmp_path / "plan.svg"
    result = plan_layouts(load_site(EXAMPLE), best=3, draw=plan_picture_writer(out))
    assert result["picture"] == str(out)
    root = ET.parse(out).getroot()  # raises on malformed XML
    assert root.tag == SVG + "svg"
    by_id = {e.get("id"): e for e in root.iter() if e.get("id")}
    wire = by_id["wire-1"]
    assert wire.tag == SVG + "polyline" and wire.get("class") == "aerial-wire"
    assert len(wire.get("points").split()) == len(result["layouts"][0]["top_points_m"])
    assert by_id["lead-in-1"].get("class") == "lead-in"
    classes = {e.get("class") for e in root.iter()}
    assert {"fall-zone", "lot", "building", "support", "entry", "scale-bar", "north-arrow", "obstacle"} <= classes
    assert "overhead-line power" in classes and "overhead-line telecom" in classes


def test_existing_file_is_not_overwritten_without_force(tmp_path, scene):
    out = tmp_path / "plan.svg"
    out.write_text("keep me", encoding="utf-8")
    with pytest.raises(AerialError, match="already exists; choose another name or add --force"):
        write_plan_picture(out, scene)
    assert out.read_text(encoding="utf-8") == "keep me"
    write_plan_picture(out, scene, force=True)
    ET.parse(out)
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".part")]


def test_refuses_to_write_over_the_site_file(tmp_path, scene):
    site_copy = tmp_path / "site.svg"
    site_copy.write_text("input", encoding="utf-8")
    with pytest.raises(AerialError, match="refusing to write over an input file"):
        write_plan_picture(site_copy, scene, force=True, protected=(site_copy,))


def test_unknown_picture_type_lists_the_choices(tmp_path, scene):
    with pytest.raises(AerialError, match=r"'\.gif' is not a valid picture type, must be one of '\.svg', '\.png'"):
        write_plan_picture(tmp_path / "plan.gif", scene)


def test_png_through_matplotlib(tmp_path, scene):
    out = write_plan_picture(tmp_path / "plan.png", scene)
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (PNG specification, ISO/IEC 15948)


def test_svg_text_escapes_names(scene):
    s = dict(scene)
    s["title"] = 'a <b> & "c"'
    ET.fromstring(svg_text(s).split("\n", 1)[1])


@pytest.mark.parametrize("span, bar", [(60.0, 10.0), (9.0, 2.0), (300.0, 50.0), (1.0, 0.2)])
def test_scale_bar_lengths_are_round(span, bar):
    assert nice_length(span) == bar


def test_cli_picture_exit_codes(tmp_path, capsys):
    out = tmp_path / "lot.svg"
    assert main(["layout", str(EXAMPLE), "--picture", str(out), "--json"]) == EXIT_OK
    capsys.readouterr()
    assert main(["layout", str(EXAMPLE), "--picture", str(out)]) == EXIT_USER
    assert "already exists; choose another name or add --force" in capsys.readouterr().err
    assert main(["layout", str(EXAMPLE), "--picture", str(out), "--force", "--json"]) == EXIT_OK


def test_cli_picture_writes_lengths_as_the_text_does(tmp_path, capsys):
    """Heights and the fall-zone distance on the drawing follow the command's one length rule (three significant
    figures), in feet under --units us: 12 m = 39.4 ft, 5.4864 m = 18 ft, 18 m = 59.1 ft (NIST SP 811:
    1 ft = 0.3048 m exactly); the layout's reason line says the oak's 39.4 ft too (consistency check)."""
    out = tmp_path / "lot.svg"
    assert main(["layout", str(EXAMPLE), "--picture", str(out), "--units", "us"]) == EXIT_OK
    text = " ".join(capsys.readouterr().out.split())
    svg = out.read_text(encoding="utf-8")
    assert "oak 39.4 ft<" in svg and "back_eave 18 ft<" in svg and "18.0 ft" not in svg
    assert "keep 59.1 ft clear" in svg
    assert "junction 39.4 ft high" in text
