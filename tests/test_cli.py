"""The command line, run in-process: exit codes, one-line messages, the JSON contract.

Sites here are the invented examples in site_examples/ and small invented test inputs.
"""

import hashlib
import json

import pytest

from aerial.cli import main

from .conftest import EXAMPLES, MINIMAL

REQUIRED_AERIAL_KEYS = (
    "capacitance_f", "effective_height_m", "radiation_resistance_ohm", "impedance_ohm",
    "conductor_loss_ohm", "ground_loss_ohm", "efficiency", "model",
)


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_check_exits_0_on_examples(capsys, path):
    code, out, err = run(capsys, "check", str(path))
    assert code == 0, err
    assert "valid" in out


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_report_json_holds_the_contract(capsys, path):
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    code, out, err = run(capsys, "report", str(path), "--json")
    assert code == 0, err
    data = json.loads(out)
    for key in ("site", "geometry", "frequencies_hz", "aerial", "cautions", "warnings", "tuning", "stations"):
        assert key in data
    for key in ("wires", "feed_m", "total_length_m"):
        assert key in data["geometry"]
    for wire in data["geometry"]["wires"]:
        assert wire["role"] in ("aerial", "lead-in", "earth lead", "counterpoise")
        assert all(len(p) == 3 for p in wire["points_m"])
        assert wire["radius_m"] > 0
    n = len(data["frequencies_hz"])
    for key in REQUIRED_AERIAL_KEYS:
        assert key in data["aerial"], key
        if key != "model":
            assert len(data["aerial"][key]) == n
    assert all(len(z) == 2 for z in data["aerial"]["impedance_ohm"])
    assert data["cautions"], "every report carries the safety cautions"
    assert not any("could not be computed" in w for w in data["warnings"]), "no figure may be missing"
    for key in REQUIRED_AERIAL_KEYS[:-1]:
        assert None not in (data["aerial"][key] if key != "impedance_ohm" else sum(data["aerial"][key], []))
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before


def test_report_without_site_uses_builtin_example(capsys):
    code, out, err = run(capsys, "report", "--json")
    assert code == 0, err
    assert json.loads(out)["site"]["file"] == "<built-in example>"


def test_rich_report_prints_cautions_and_tables(capsys):
    code, out, err = run(capsys, "report")
    assert code == 0, err
    assert "Safety" in out and "gas piping" in out
    assert "effective height" in out


def test_json_is_deterministic(capsys):
    _, first, _ = run(capsys, "report", "--json")
    _, second, _ = run(capsys, "report", "--json")
    assert first == second


def test_bad_file_exits_2_with_one_line(capsys, write_site):
    bad = write_site(MINIMAL.replace("[0, 0, 0.5]", "[0, 0, -1]"))
    code, out, err = run(capsys, "report", str(bad))
    assert code == 2
    assert out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and "runs[0].points[0][2]" in lines[0] and "Traceback" not in err


def test_missing_file_exits_2(capsys, tmp_path):
    code, _, err = run(capsys, "check", str(tmp_path / "absent.toml"))
    assert code == 2 and "no such file" in err


def test_malformed_toml_exits_2(capsys, write_site):
    code, _, err = run(capsys, "check", str(write_site("[site\n")))
    assert code == 2 and "not valid TOML" in err


def test_unknown_option_exits_2(capsys):
    code, _, err = run(capsys, "report", "--frobnicate")
    assert code == 2 and "unrecognized arguments" in err and len(err.strip().splitlines()) == 1


def test_bad_step_exits_2(capsys):
    code, _, err = run(capsys, "report", "--step", "3 parsecs")
    assert code == 2 and "--step" in err


def test_every_command_has_help(capsys):
    for cmd in ("check", "report", "layout", "coil"):
        with pytest.raises(SystemExit) as info:
            main([cmd, "--help"])
        assert info.value.code == 0
        out, _ = capsys.readouterr()
        assert "usage: aerial " + cmd in out


def test_coil_helper_gives_turns_and_length(capsys):
    code, out, err = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--inductance", "240 uH", "--json")
    assert code == 0, err
    data = json.loads(out)
    # Wheeler's formula / Nagaoka's current sheet: a 50 mm form needs roughly 70 close-wound turns of
    # 26 AWG for 240 uH (consistency with tests/models/test_coil.py, computed from the formula)
    assert 60 < data["turns"] < 80
    assert data["winding_length_m"] == pytest.approx(data["whole_turns"] * data["wire_diameter_m"], rel=1e-6)
    assert data["unloaded_q"] > 0


@pytest.mark.parametrize("argv, words", [
    (["--wire", "99 AWG", "--turns", "3"], "not a gauge"),
    (["--wire", "26", "--turns", "3"], "with its system"),
    (["--wire", "26 AWG", "--turns", "0"], "--turns"),
    (["--wire", "26 AWG", "--inductance", "-5 uH"], "greater than zero"),
])
def test_coil_helper_rejects_bad_input(capsys, argv, words):
    code, _, err = run(capsys, "coil", "--diameter", "50 mm", *argv)
    assert code == 2 and words in err and len(err.strip().splitlines()) == 1


def test_pictures_are_written_and_never_overwritten(capsys, tmp_path):
    pics = tmp_path / "pics"
    code, _, err = run(capsys, "report", "--pictures", str(pics))
    assert code == 0, err
    names = sorted(p.name for p in pics.iterdir())
    assert "aerial-impedance.svg" in names and "aerial-capacitance.svg" in names
    import xml.etree.ElementTree as ET

    ET.parse(pics / "aerial-impedance.svg")  # valid SVG (XML)
    before = (pics / "aerial-impedance.svg").read_bytes()
    code, _, err = run(capsys, "report", "--pictures", str(pics))
    assert code == 2 and "already exists" in err and "--force" in err
    assert (pics / "aerial-impedance.svg").read_bytes() == before
    code, _, err = run(capsys, "report", "--pictures", str(pics), "--force")
    assert code == 0, err
    assert not [p for p in pics.iterdir() if p.name.endswith(".part")]


def test_bench_measurement_replaces_the_estimate(capsys, write_site):
    from .conftest import ROOT

    text = (ROOT / "site_examples" / "backyard_inverted_l.toml").read_text()
    text = text.replace('earphone = "high-impedance"\n', 'earphone = "high-impedance"\n\n[receiver.measured]\n'
                        'coil = "240 uH"\ncapacitor = "150 pF"\nfrequency = "600 kHz"\n')
    code, out, err = run(capsys, "report", str(write_site(text)), "--json")
    assert code == 0, err
    assert json.loads(out)["tuning"]["source"] == "measured"


def test_a_closed_pipe_is_not_an_error():
    # `aerial report | head -1`: the reader goes away; aerial exits 0 with nothing on stderr
    import subprocess
    import sys

    proc = subprocess.Popen([sys.executable, "-m", "aerial.cli", "report"], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE)
    proc.stdout.readline()
    proc.stdout.close()
    err = proc.stderr.read()
    assert proc.wait(timeout=120) == 0
    assert err == b""
