"""Ordinary faults and slips, each seen through the command line: one line, exit 2, nothing half-made.

Every site here is invented input-handling data.
"""

from __future__ import annotations

import errno
import io
import os
import sys
import tempfile

import pytest

import aerial.outputs.files
from aerial.cli import EXIT_USER, main

from .conftest import MINIMAL, ROOT, one_line, run

EXAMPLES = ROOT / "site_examples"


# --------------------------------------------------------------------------- units and numbers


@pytest.mark.parametrize("key_line, value, words", [
    ('earphone = "high-impedance"', 'earphone = "1 mohm"', '"mohm" reads 1 mohm = 0.001 ohm'),
    ('power = "10 kW"', 'power = "5 mw"', '"MW" reads 5 MW = 5e+06 W'),
    ('distance = "25 km"', 'distance = "9 Mm"', '"mm" reads 9 mm = 0.009 m'),
])
def test_ambiguous_prefixes_are_refused_naming_both_readings(capsys, tmp_path, key_line, value, words):
    text = (EXAMPLES / "backyard_inverted_l.toml").read_text(encoding="utf-8")
    assert key_line in text
    p = tmp_path / "site.toml"
    p.write_text(text.replace(key_line, value), encoding="utf-8")
    code, out, err = run(capsys, "check", str(p))
    assert code == EXIT_USER and out == ""
    assert "ambiguous unit" in one_line(err) and words in err


def test_milliwatts_are_milliwatts(capsys, write_site):
    p = write_site(MINIMAL + '\n[[stations]]\nfrequency = "810 kHz"\npower = "500 mW"\ndistance = "1 mi"\n')
    code, out, err = run(capsys, "report", str(p), "--json")
    assert code == 0, err
    import json

    station = json.loads(out)["stations"][0]
    assert station["power_w"] == pytest.approx(0.5)
    assert station["distance_m"] == pytest.approx(1609.344)  # NIST SP 811, B.8: 1 mi = 1609.344 m exactly
    # read as written, but a power below any broadcaster's is pointed out with both spellings (SI prefixes: m is
    # milli, M is mega, BIPM SI Brochure, 9th edition, Table 7)
    words = " ".join(json.loads(out)["warnings"])
    assert 'stations[0].power: "500 mW" is read as 500 mW' in words and '"MW"' in words


def test_a_broadcast_power_draws_no_power_note(capsys, write_site):
    p = write_site(MINIMAL + '\n[[stations]]\nfrequency = "810 kHz"\npower = "5 kW"\ndistance = "20 km"\n')
    code, out, err = run(capsys, "report", str(p), "--json")
    assert code == 0, err
    import json

    assert not any(".power:" in w for w in json.loads(out)["warnings"])


@pytest.mark.parametrize("written, suggested", [("20 AGW", "20 AWG"), ("16 swq", "16 SWG"), ("1/0 AWGG", "1/0 AWG")])
def test_a_misspelt_gauge_system_is_named_with_a_suggestion(capsys, write_site, written, suggested):
    p = write_site(MINIMAL + f'\n[wire]\ngauge = "{written}"\n')
    code, out, err = run(capsys, "check", str(p))
    assert code == EXIT_USER and out == ""
    assert f'wire.gauge = "{written}": did you mean "{suggested}"?' in one_line(err)


@pytest.mark.parametrize("digits", [400, 5000])
def test_integers_with_hundreds_or_thousands_of_digits(capsys, write_site, digits):
    p = write_site(MINIMAL.replace('length = "2.4 m"', "length = 1" + "0" * digits).replace(
        "[[earth.rods]]", "[[earth.rods]]\ncount = 1"))
    code, out, err = run(capsys, "check", str(p))
    assert code == EXIT_USER and out == ""
    line = one_line(err)
    assert str(p) in line
    assert "earth.rods[0].length" in line or "thousands of digits" in line


def test_huge_integer_count_names_its_key(capsys, write_site):
    p = write_site(MINIMAL.replace("[[earth.rods]]", "[[earth.rods]]\ncount = 1" + "0" * 400))
    code, _, err = run(capsys, "check", str(p))
    assert code == EXIT_USER and "earth.rods[0].count = " in one_line(err)


def test_feet_inches_fractions_in_a_site(capsys, write_site):
    p = write_site(MINIMAL.replace("[0, 0, 10]]", '[0, 0, "32 ft 9 1/2 in"]]').replace(
        'length = "2.4 m"', 'length = "8 ft"\ndiameter = "5/8 in"'))
    code, out, err = run(capsys, "check", str(p), "--json")
    assert code == 0, err
    import json

    wire = json.loads(out)["geometry"]["wires"][0]
    # NIST SP 811: 32 ft 9.5 in = 393.5 in = 9.9949 m
    assert wire["points_m"][-1][2] == pytest.approx(9.9949, abs=1e-9)


# --------------------------------------------------------------------------- site words


def test_unknown_key_suggests_the_nearest(capsys, write_site):
    p = write_site(MINIMAL + '\n[wire]\nguage = "10 AWG"\n')
    code, _, err = run(capsys, "check", str(p))
    assert code == EXIT_USER
    assert 'wire.guage = "10 AWG": unknown key; did you mean "gauge"?' in one_line(err)


@pytest.mark.parametrize("where", ["[[earth.rods]]\nlength = 2", "[site]\nname = 'x'", "[receiver]\nheight = 0"])
def test_notes_are_accepted_in_any_table(capsys, write_site, where):
    text = MINIMAL.replace(where.split("\n")[0] + "\n", where.split("\n")[0] + '\nnotes = "for my own record"\n', 1)
    code, _, err = run(capsys, "check", str(write_site(text)))
    assert code == 0, err


@pytest.mark.parametrize("text", ["the gas-pipe by the boiler", "Gas, yellow pipe", "GAS", "natural_gas main",
                                  "old gaspipe"])
def test_gas_in_any_spelling_is_refused(capsys, write_site, text):
    site = MINIMAL.replace('length = "2.4 m"', f'length = "2.4 m"\nnotes = "{text}"')
    code, _, err = run(capsys, "check", str(write_site(site)))
    assert code == 3 or code == EXIT_USER
    assert "gas piping is never an earth" in one_line(err) and "earth.rods[0].notes" in err


@pytest.mark.parametrize("text", ["radiator pipe in the hall", "central heating return"])
def test_heating_pipe_is_not_an_earth(capsys, write_site, text):
    site = MINIMAL.replace("[[earth.rods]]\nlength = \"2.4 m\"\n",
                           f'[earth.water_pipe]\ncontinuous_metal = true\ncontents = "{text}"\n')
    code, _, err = run(capsys, "check", str(write_site(site)))
    assert code == EXIT_USER
    assert "a radiator or heating pipe is not an earth" in one_line(err) and "earth.water_pipe.contents" in err


def test_soil_in_everyday_words_is_mapped_and_said(capsys, write_site):
    p = write_site('[site]\nsoil = "clay"\n' + MINIMAL.replace("[site]\n", "[site_]\n").replace("[site_]\n", ""))
    code, out, err = run(capsys, "check", str(p))
    assert code == 0, err
    text = " ".join(out.split())
    assert 'soil "clay" is read as the category "wet"' in text


@pytest.mark.parametrize("old, new, key", [
    ('[0, 0, 0.5], [0, 0, 10]', '[0, 0, 1e-300], [0, 0, 10]', "runs[0].points[0]"),
    ('height = "0 m"', 'height = "1 mm"', "receiver.height"),
])
def test_heights_below_the_floor(capsys, write_site, old, new, key):
    code, _, err = run(capsys, "check", str(write_site(MINIMAL.replace(old, new))))
    assert code == EXIT_USER and f"{key} = " in one_line(err)


def test_support_height_of_1e_300_is_refused(capsys, write_site):
    site = MINIMAL.replace("[[runs]]\npoints = [[0, 0, 0.5], [0, 0, 10]]\n", (
        "[supports.a]\nat = [0, 0]\nheight = 1e-300\n[supports.b]\nat = [20, 0]\nheight = 8\n"
        '[[spans]]\nfrom = "a"\nto = "b"\n'))
    code, _, err = run(capsys, "check", str(write_site(site)))
    assert code == EXIT_USER and "supports.a.height = 1e-300: a support lower than 1 cm" in one_line(err)


def test_cleared_points_say_missing(capsys, write_site):
    code, _, err = run(capsys, "check", str(write_site(MINIMAL.replace("points = [[0, 0, 0.5], [0, 0, 10]]", 'name = "x"'))))
    assert code == EXIT_USER and "runs[0].points" in one_line(err) and "None" not in err and "missing" in err


def test_counterpoise_from_the_aerial_is_refused_at_load(capsys, write_site):
    # the case that passed check and failed inside the full-wave solver
    site = write_site("""
        [[runs]]
        points = [[0, 0, 0.3], [0, 0, 7]]
        [receiver]
        at = [0, -1]
        height = "0.3 m"
        coil = "200 uH"
        [[earth.counterpoise]]
        points = [[0, 0, 0.3], [0, 8, 0.2]]
        """)
    for argv in (["check"], ["report", "--full-wave"]):
        code, out, err = run(capsys, argv[0], str(site), *argv[1:])
        assert code == EXIT_USER and out == ""
        line = one_line(err)
        assert "earth.counterpoise[0].points[0]" in line and "receiver's earth terminal" in line
        assert "segments.feed" not in line


# --------------------------------------------------------------------------- limits


def test_worst_legal_supports_spans_runs_and_bands_load(capsys, write_site):
    from aerial.site.reader import MAX_BAND_ENTRIES, MAX_SUPPORTS, MAX_WIRE_PIECES

    supports = "".join(f"[supports.s{i}]\nat = [{i}, 0]\nheight = 5\n" for i in range(MAX_SUPPORTS))
    runs = "".join(f"[[runs]]\npoints = [[{i}, 5, 1], [{i}, 5, 6]]\n" for i in range(MAX_WIRE_PIECES - 2))  # + the vertical + its lead-in
    bands = ", ".join(f'{{from = "{100 + i} kHz", to = "{30000 - i} kHz"}}' for i in range(MAX_BAND_ENTRIES))
    site = (f"[site]\nbands = [{bands}]\n" + supports + runs +
            "[[runs]]\npoints = [[0, 0, 0.5], [0, 0, 10]]\n[receiver]\nat = [0, 0]\nheight = 0\n"
            "[[earth.rods]]\nlength = 2\n")
    code, out, err = run(capsys, "check", str(write_site(site)))
    assert code == 0, err
    over = site.replace("[supports.s0]", f"[supports.extra]\nat = [0, 9]\nheight = 5\n[supports.s0]")
    code, _, err = run(capsys, "check", str(write_site(over)))
    assert code == EXIT_USER and "too many supports" in one_line(err)


def test_sweep_too_fine_is_refused(capsys, write_site):
    site = MINIMAL.replace('[site]\n', '[site]\nbands = ["lf", "mf", "hf", {from = "10 kHz", to = "30 MHz"}, '
                                       '{from = "20 kHz", to = "29 MHz"}]\nfrequency_step = "100 Hz"\n')
    code, _, err = run(capsys, "check", str(write_site(site)))
    assert code == EXIT_USER and "site.frequency_step" in one_line(err) and "at most 60,000" in err
    code, _, err = run(capsys, "report", str(write_site(site.replace('frequency_step = "100 Hz"', ""))),
                       "--step", "100 Hz")
    assert code == EXIT_USER and "--step" in one_line(err)


# --------------------------------------------------------------------------- operating-system faults


def _raise(no):
    def fail(*a, **k):
        raise OSError(no, os.strerror(no))
    return fail


def test_read_only_pictures_folder(capsys, monkeypatch, tmp_path, write_site):
    monkeypatch.setattr(aerial.outputs.files.tempfile, "mkstemp", _raise(errno.EROFS))
    pics = tmp_path / "pics"
    code, out, err = run(capsys, "report", str(write_site(MINIMAL)), "--pictures", str(pics))
    assert code == EXIT_USER and out == ""
    assert "read-only file system" in one_line(err) and str(pics) in err
    assert not pics.exists()  # the folder made for the pictures is taken away again


@pytest.mark.parametrize("no, words", [
    (errno.EROFS, "read-only file system"), (errno.EACCES, "permission denied"),
    (errno.ENOSPC, "no space left"), (errno.ENAMETOOLONG, "too long"), (errno.EDQUOT, "quota"),
])
def test_write_faults_are_one_line_for_the_user(monkeypatch, tmp_path, no, words):
    from aerial.core.errors import AerialError

    monkeypatch.setattr(aerial.outputs.files.tempfile, "mkstemp", _raise(no))
    with pytest.raises(AerialError) as info:
        aerial.outputs.files.write_atomic(tmp_path / "x.svg", "<svg/>")
    assert words in str(info.value) and str(tmp_path / "x.svg") in str(info.value)
    assert list(tmp_path.iterdir()) == []


def test_disk_full_while_writing_leaves_nothing(capsys, monkeypatch, tmp_path):
    real_fdopen = os.fdopen

    class Full(io.RawIOBase):
        def __init__(self, fd):
            self.fd = fd

        def write(self, b):
            raise OSError(errno.ENOSPC, "No space left on device")

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            os.close(self.fd)

    monkeypatch.setattr(aerial.outputs.files.os, "fdopen", lambda fd, mode="r": Full(fd) if "w" in mode else real_fdopen(fd, mode))
    target = tmp_path / "plan.svg"
    code, _, err = run(capsys, "layout", str(EXAMPLES / "suburban_lot_service_line.toml"), "--picture", str(target))
    assert code == EXIT_USER and "no space left" in one_line(err)
    assert list(tmp_path.iterdir()) == []


def test_picture_whose_parent_is_a_file(capsys, tmp_path):
    site = tmp_path / "site.toml"
    site.write_text((EXAMPLES / "suburban_lot_service_line.toml").read_text(encoding="utf-8"), encoding="utf-8")
    code, _, err = run(capsys, "layout", str(site), "--picture", str(site / "plan.svg"))
    assert code == EXIT_USER and "is a file, not a folder" in one_line(err)


def test_picture_name_too_long(capsys, tmp_path):
    code, _, err = run(capsys, "layout", str(EXAMPLES / "suburban_lot_service_line.toml"),
                       "--picture", str(tmp_path / ("a" * 300 + ".svg")))
    assert code == EXIT_USER and "too long" in one_line(err)
    assert list(tmp_path.iterdir()) == []


def test_site_name_too_long_and_link_loop(capsys, tmp_path):
    code, _, err = run(capsys, "check", str(tmp_path / ("a" * 300 + ".toml")))
    assert code == EXIT_USER and "too long" in one_line(err)
    (tmp_path / "a").symlink_to(tmp_path / "b")
    (tmp_path / "b").symlink_to(tmp_path / "a")
    code, _, err = run(capsys, "check", str(tmp_path / "a"))
    assert code == EXIT_USER and "loop of symbolic links" in one_line(err)


def test_full_standard_output(monkeypatch, capsys):
    class FullStdout(io.StringIO):
        def write(self, s):
            raise OSError(errno.ENOSPC, "No space left on device")

        def fileno(self):
            raise io.UnsupportedOperation

    monkeypatch.setattr(sys, "stdout", FullStdout())
    code = main(["report", "--json"])
    err = capsys.readouterr().err
    assert code == EXIT_USER
    assert one_line(err) == "aerial: cannot write the output (no space left on the device)"


# --------------------------------------------------------------------------- small ones


def test_no_command_is_usage_on_stderr(capsys):
    code, out, err = run(capsys)
    assert code == EXIT_USER and out == ""
    assert err.startswith("usage: aerial") and "a command is needed" in err


def test_plain_help_is_exit_0(capsys):
    with pytest.raises(SystemExit) as info:
        main(["--help"])
    assert info.value.code == 0
    assert "usage: aerial" in capsys.readouterr().out


@pytest.mark.parametrize("argv, option", [
    (["report", "--pictures", ""], "--pictures"), (["report", "--step", ""], "--step"),
    (["layout", str(EXAMPLES / "suburban_lot_service_line.toml"), "--picture", ""], "--picture"),
    (["coil", "--diameter", "50 mm", "--wire", "", "--turns", "10"], "--wire"),
])
def test_empty_options_are_refused(capsys, argv, option):
    code, out, err = run(capsys, *argv)
    assert code == EXIT_USER and out == ""
    assert f"{option} is empty" in one_line(err)


def test_empty_site_path(capsys):
    code, _, err = run(capsys, "check", "")
    assert code == EXIT_USER and "site file name is empty" in one_line(err)


def test_matplotlib_gets_a_temporary_config_folder_when_home_is_not_writable(monkeypatch, tmp_path):
    from aerial.outputs.plan_drawing import matplotlib_config_dir

    home_file = tmp_path / "not-a-folder"
    home_file.write_text("x")
    monkeypatch.delenv("MPLCONFIGDIR", raising=False)
    monkeypatch.delenv("XDG_CONFIG_HOME", raising=False)
    monkeypatch.setenv("HOME", str(home_file))
    matplotlib_config_dir()
    folder = os.environ["MPLCONFIGDIR"]
    assert os.path.isdir(folder) and folder.startswith(tempfile.gettempdir())


# --------------------------------------------------------------------------- aerial coil


@pytest.mark.parametrize("argv, words", [
    (["--diameter", "1 km", "--wire", "26 AWG", "--inductance", "10 nH"], "--diameter 1 km"),
    (["--diameter", "1 m", "--wire", "26 AWG", "--inductance", "10 nH"], "one turn on a 1000 mm former"),
    (["--diameter", "50 mm", "--wire", "26 AWG", "--turns", "1e-300"], "from 1 to 10000"),
    (["--diameter", "50 mm", "--wire", "26 AWG", "--turns", "0.5"], "from 1 to 10000"),
    (["--diameter", "50 mm", "--wire", "1 mm", "--strands", "2", "--turns", "10"], "--strand-size"),
    (["--diameter", "50 mm", "--wire", "0.2 mm", "--strands", "20", "--strand-size", "40 AWG", "--turns", "10"],
     "do not fit"),
])
def test_coil_edges(capsys, argv, words):
    code, out, err = run(capsys, "coil", *argv)
    assert code == EXIT_USER and out == ""
    assert words in one_line(err)
    assert "nan" not in err and "must have different signs" not in err


def test_coil_stranded_wire_and_diameter_wire(capsys):
    import json

    code, out, err = run(capsys, "coil", "--diameter", "50 mm", "--wire", "1 mm", "--strands", "20",
                         "--strand-size", "40 AWG", "--turns", "60", "--json")
    assert code == 0, err
    data = json.loads(out)
    assert data["strands"] == 20 and data["wire_diameter_m"] == pytest.approx(1e-3)
    # --wire as a diameter; the winding's diameter is taken to the wire centres
    code, out, err = run(capsys, "coil", "--diameter", "50 mm", "--wire", "0.4 mm", "--turns", "60", "--json")
    data = json.loads(out)
    assert data["winding_diameter_m"] == pytest.approx(0.0504) and "wire centres" in data["diameter_convention"]


def test_coil_warns_on_absurd_results(capsys):
    code, out, err = run(capsys, "coil", "--diameter", "50 mm", "--wire", "26 AWG", "--inductance", "1 H")
    assert code == 0, err
    assert "not a practical single-layer coil" in " ".join(out.split())


def test_check_reads_the_plan_table_too(capsys, tmp_path):
    text = (EXAMPLES / "suburban_lot_service_line.toml").read_text(encoding="utf-8")
    assert "\n[plan]\n" in text
    p = tmp_path / "site.toml"
    p.write_text(text.replace("\n[plan]\n", "\n[plan]\nentyr = 3\n", 1), encoding="utf-8")
    code, _, err = run(capsys, "check", str(p))
    assert code == EXIT_USER and 'plan.entyr = 3: unknown key; did you mean "entry"?' in one_line(err)
