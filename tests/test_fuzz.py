"""Hostile and sloppy site files: a clear one-line answer or a correct report, never a traceback.

The mutation engine and the classifier live in benchmarks/fuzz_sites.py (the
full 10,000-case run and its figures are in docs/reliability.md); here a few
hundred seeded cases run in worker processes, plus fixed regression inputs
and a handful of real subprocesses. The sites are mutations of the invented
examples in site_examples/ (demo data, not a source of truth).
"""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
import tomllib

import pytest


from .conftest import EXAMPLES, MINIMAL, ROOT, one_line, run
from .fuzzlib import load

fz = load()

#: Seeded cases run in CI (the full run is benchmarks/fuzz_sites.py --count 10000 --seed 1).
CI_CASES = 60
CI_SEED = 7


# --------------------------------------------------------------------------- the harness itself


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_toml_writer_round_trips_the_examples(path):
    doc = tomllib.loads(path.read_text(encoding="utf-8"))
    assert tomllib.loads(fz.toml_dumps(doc)) == doc


def test_toml_writer_keeps_nan_inf_and_odd_strings():
    doc = {"a": float("nan"), "b": float("-inf"), "c": "nul\x00 \x7f \"q\" \\ 名", "odd key": [{"x": 1}, 2]}
    back = tomllib.loads(fz.toml_dumps(doc))
    assert math.isnan(back["a"]) and back["b"] == -math.inf
    assert back["c"] == doc["c"] and back["odd key"] == doc["odd key"]


def test_cases_are_reproducible_from_seed_and_index():
    for index in (0, 1, 17, 999):
        a, b = fz.make_case(3, index), fz.make_case(3, index)
        assert (a.data, a.special, a.file_name, a.mutations, a.extra_args) == (
            b.data, b.special, b.file_name, b.mutations, b.extra_args)
    assert fz.make_case(3, 5).data != fz.make_case(4, 5).data or fz.make_case(3, 5).mutations != fz.make_case(4, 5).mutations


@pytest.mark.parametrize("code, out, err, expected", [
    (0, '{"a_m": 1.0, "warnings": []}', "", "ok"),
    (0, '{"a_m": NaN}', "", "bad-json"),
    (0, '{"a_m": null}', "", "null-figure"),
    (0, '{"x": [1.0, null]}', "", "null-figure"),
    (0, '{"warnings": ["Some figures could not be computed and are shown as null: a"]}', "", "null-figure"),
    (0, '{"layouts": [{"clearance_margin_m": null}]}', "", "ok"),  # documented: no power line
    (0, '{"a_m": 1.0}', "numpy RuntimeWarning: overflow\n", "bad-stderr"),
    (1, "", "aerial: internal error (ValueError: x)\n", "internal-error"),
    (2, "", "Traceback (most recent call last):\n  File ...\nValueError: x\n", "bad-stderr"),
    (2, "", "aerial: something went wrong\n", "bad-stderr"),  # names no file
    (2, "", "aerial: S.toml:3: spans[0].sag = -1: expected a sag of 0 or more\n", "user-error"),
    (2, "", "aerial: S.toml: spans[0].sag\n", "bad-stderr"),  # names no value
    (2, "", "aerial: --step 0 Hz: expected a step from 100 Hz to 1 MHz\n", "user-error"),
    (3, "", "aerial: refused: inside a fall zone (site file S.toml)\n", "refused"),
    (130, "", "aerial: interrupted\n", "bad-exit"),
])
def test_classifier_sorts_outcomes(code, out, err, expected):
    assert fz.classify("report", code, out, err, "", "S.toml", True)[0] == expected


# --------------------------------------------------------------------------- seeded cases


def test_seeded_fuzz_cases_have_no_failures(tmp_path):
    summary = fz.run_fuzz(CI_CASES, CI_SEED, workers=2, timeout=60.0, save_dir=tmp_path / "failures")
    assert summary.count == CI_CASES
    lines = []
    for index, description, results in summary.failures:
        for r in results:
            if r["class"] in fz.FAILURE_CLASSES:
                lines.append(f"case {index} [{r['command']}] {r['class']}: {r['why'][:200]} <- {description[:200]}")
    assert not lines, "\n".join(lines)
    assert summary.outcomes.get("ok", 0) > 0 and summary.outcomes.get("user-error", 0) > 0


# --------------------------------------------------------------------------- fixed hostile inputs (regressions)


def test_folder_instead_of_a_file(capsys, tmp_path):
    code, out, err = run(capsys, "check", str(tmp_path))
    assert code == 2 and out == ""
    line = one_line(err)
    assert line.startswith(f"aerial: {tmp_path}:") and line.endswith("is a folder; expected a site file (.toml)")


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes need a POSIX system")
def test_named_pipe_is_refused_without_blocking(capsys, tmp_path):
    # reading a pipe nobody writes to would block forever
    p = tmp_path / "pipe.toml"
    os.mkfifo(p)
    code, _, err = run(capsys, "report", str(p), "--json")
    assert code == 2
    line = one_line(err)
    assert line.startswith(f"aerial: {p}:") and line.endswith("is not a regular file; expected a site file (.toml)")


def test_device_file_is_refused(capsys):
    # /dev/zero never ends: it must not be read
    if not os.path.exists("/dev/zero"):
        pytest.skip("no /dev/zero on this system")
    code, _, err = run(capsys, "check", "/dev/zero")
    assert code == 2 and "not a regular file" in one_line(err)


def test_unreadable_file(capsys, tmp_path):
    # chmod 000 does not stop root, so the harness makes the read raise PermissionError
    p = tmp_path / "locked.toml"
    p.write_text(MINIMAL, encoding="utf-8")
    with fz._unreadable(p):
        code, _, err = run(capsys, "check", str(p))
    assert code == 2
    line = one_line(err)
    assert line.startswith(f"aerial: {p}:") and line.endswith("cannot be read (permission denied)")


def test_ten_megabyte_file_is_refused_before_reading(capsys, tmp_path):
    p = tmp_path / "big.toml"
    p.write_bytes(MINIMAL.encode() + b"# " + b"x" * (10 * 2**20) + b"\n")
    code, _, err = run(capsys, "check", str(p))
    assert code == 2 and "a site file is at most 2 MB" in one_line(err)


def test_byte_order_mark_is_accepted(capsys, tmp_path):
    # some editors save UTF-8 with a byte-order mark; it is not part of the text
    p = tmp_path / "bom.toml"
    p.write_bytes(b"\xef\xbb\xbf" + MINIMAL.encode())
    code, out, err = run(capsys, "check", str(p), "--json")
    assert code == 0, err
    assert json.loads(out)["site"]["name"] == "test vertical"


@pytest.mark.parametrize("data, words", [
    (b"\x00\xff\xfe binary \x80\x81", "is not UTF-8 text"),
    ("[site]\nname = \"x\"\n[site]\n".encode(), "not valid TOML"),
    (MINIMAL.encode("utf-16"), "is not UTF-8 text"),
    (b"", "the site has no aerial wire"),
])
def test_junk_files_give_one_line(capsys, tmp_path, data, words):
    p = tmp_path / "junk.toml"
    p.write_bytes(data)
    code, _, err = run(capsys, "report", str(p), "--json")
    assert code == 2
    line = one_line(err)
    assert line.startswith(f"aerial: {p}") and words in line


def test_file_name_with_a_line_break_stays_one_line(capsys, tmp_path):
    p = tmp_path / "two\nlines.toml"
    p.write_text("[site]\nname = 3\n", encoding="utf-8")
    code, _, err = run(capsys, "check", str(p))
    assert code == 2
    assert "two\\nlines.toml" in one_line(err)


@pytest.mark.parametrize("value, words", [
    ("nan", "not finite"),
    ("inf", "not finite"),
    ("-inf", "not finite"),
    ('"1e400 m"', "not finite"),
    ("1e300", "expected a length within 40,000 km"),
    ('"20 km"', "expected a length within 10 km"),
    ('"12 furlong"', 'unknown unit "furlong"'),
    ('"3 ft 4"', "expected a length"),
    ('"12"', "needs its unit written out"),
    ('""', "expected a length"),
])
def test_odd_numbers_and_units_name_key_and_value(capsys, write_site, value, words):
    p = write_site(MINIMAL.replace('length = "2.4 m"', f"length = {value}"))
    code, _, err = run(capsys, "report", str(p), "--json")
    assert code == 2
    line = one_line(err)
    assert f"earth.rods[0].length = " in line and words in line, line


def test_blank_key_is_shown_quoted(capsys, write_site):
    p = write_site(MINIMAL.replace("[site]\n", '[site]\n" " = 1\n'))
    code, _, err = run(capsys, "check", str(p))
    assert code == 2
    assert 'site." " = 1: unknown key' in one_line(err)


def test_thousands_of_wires_are_refused_at_once(capsys, write_site):
    runs = "".join(f"[[runs]]\npoints = [[{i * 0.7}, 0, 5], [{i * 0.7}, 10, 5]]\n" for i in range(3000))
    p = write_site(MINIMAL.replace("[receiver]", runs + "[receiver]"))
    code, _, err = run(capsys, "report", str(p), "--json")
    assert code == 2
    assert "too many wires: a site holds at most 100 straight wire pieces" in one_line(err)


def test_a_long_polyline_is_refused_by_piece_count(capsys, write_site):
    pts = ", ".join(f"[{3 * math.cos(k * 0.5):.4f}, {3 * math.sin(k * 0.5):.4f}, {4 + 0.01 * k:.3f}]" for k in range(150))
    p = write_site(MINIMAL.replace("[receiver]", f"[[runs]]\npoints = [{pts}]\n[receiver]"))
    code, _, err = run(capsys, "check", str(p))
    assert code == 2 and "too many wire pieces" in one_line(err)


def test_duplicated_span_is_refused(capsys, tmp_path):
    # two identical wires in one place make the electrostatic system singular
    text = (ROOT / "site_examples" / "backyard_inverted_l.toml").read_text(encoding="utf-8")
    text = text.replace("[lead_in]", '[[spans]]\nfrom = "eave"\nto = "walnut"\nsag = "0.4 m"\n\n[lead_in]')
    p = tmp_path / "twice.toml"
    p.write_text(text, encoding="utf-8")
    code, _, err = run(capsys, "report", str(p), "--json")
    assert code == 2
    assert "spans[1] = \"span eave to walnut\": lies along \"span eave to walnut\"" in one_line(err)


def test_wire_doubling_back_is_refused(capsys, write_site):
    p = write_site(MINIMAL.replace("[receiver]", "[[runs]]\npoints = [[0, 0, 5], [20, 0, 5], [0.005, 0, 5]]\n[receiver]"))
    code, _, err = run(capsys, "check", str(p))
    assert code == 2 and "doubles back along itself" in one_line(err)


def test_receiver_without_coil_or_capacitor_gets_a_designed_coil(capsys, write_site):
    # a homeowner sizing a wire has no tuning parts yet: the report designs a coil for a common
    # variable capacitor and says it assumed one
    p = write_site(MINIMAL)
    code, out, err = run(capsys, "report", str(p), "--json")
    assert code == 0, err
    tuning = json.loads(out)["tuning"]
    assert tuning["coil"]["inductance_h"] > 0
    assert any("15–365 pF" in n for n in tuning["notes"])


@pytest.mark.parametrize("key, value, words", [
    ("power", '"1e300 kW"', "expected a transmitter power"),
    ("distance", '"1e-300 km"', "expected a distance of at least 100 m"),
])
def test_station_bounds(capsys, write_site, key, value, words):
    station = {"power": '"10 kW"', "distance": '"20 km"'}
    station[key] = value
    text = MINIMAL.replace('height = "0 m"', 'height = "0 m"\ncoil = "240 uH"')
    text += f'\n[[stations]]\nfrequency = "1 MHz"\npower = {station["power"]}\ndistance = {station["distance"]}\n'
    p = write_site(text)
    code, _, err = run(capsys, "report", str(p), "--json")
    assert code == 2
    line = one_line(err)
    assert f"stations[0].{key} = " in line and words in line


def test_feed_joined_within_tolerance_is_analysed(capsys, tmp_path):
    # a receiver 1 mm from the wire's end is joined to it (the loader's join tolerance is 1 cm)
    text = (ROOT / "site_examples" / "portable_vertical_counterpoise.toml").read_text(encoding="utf-8")
    p = tmp_path / "near.toml"
    p.write_text(text.replace("at = [0, 0]\n", "at = [0.001, 0]\n", 1), encoding="utf-8")
    code, out, err = run(capsys, "report", str(p), "--json")
    assert code == 0, err
    assert fz._nulls(json.loads(out)) == []


def test_layout_best_out_of_range(capsys):
    code, _, err = run(capsys, "layout", str(ROOT / "site_examples" / "suburban_lot_service_line.toml"), "--best", "0")
    assert code == 2
    assert one_line(err) == "aerial: --best 0: expected a whole number from 1 to 100"


def test_refusal_names_the_site_file(capsys, tmp_path):
    # a run put right under the example's street power line
    text = (ROOT / "site_examples" / "suburban_lot_service_line.toml").read_text(encoding="utf-8")
    text = text.replace("[lead_in]", "[[runs]]\npoints = [[0, -3, 6], [10, -3, 6]]\n\n[lead_in]")
    p = tmp_path / "unsafe.toml"
    p.write_text(text, encoding="utf-8")
    code, _, err = run(capsys, "check", str(p))
    assert code == 3
    first, *reasons = err.rstrip("\n").split("\n")  # one short line, then a few lines of reasons
    assert first.startswith(f"aerial: refused: {p}: ") and "Traceback" not in err
    assert 1 <= len(reasons) <= 4 and all(r.startswith("  power line ") for r in reasons)


# --------------------------------------------------------------------------- real processes


@pytest.mark.parametrize("content, argv_tail", [
    (b"\x89PNG\r\n\x1a\n\x00\x00binary", ["report", "--json"]),
    (MINIMAL.replace('length = "2.4 m"', "length = nan").encode(), ["check"]),
    (MINIMAL.replace("[site]", '[site]\nbands = ["vlf"]').encode(), ["report", "--json"]),  # unknown band name
    (MINIMAL.encode(), ["layout", "--best", "x"]),
])
def test_no_traceback_reaches_the_terminal(tmp_path, content, argv_tail):
    p = tmp_path / "site.toml"
    p.write_bytes(content)
    argv = [sys.executable, "-m", "aerial.cli", argv_tail[0], str(p), *argv_tail[1:]]
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    env.pop("AERIAL_DEBUG", None)
    proc = subprocess.run(argv, capture_output=True, text=True, timeout=120, env=env, cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr
    assert proc.stdout == ""
    assert "Traceback" not in proc.stderr
    assert proc.stderr.count("\n") == 1 and proc.stderr.startswith("aerial: ")


# --------------------------------------------------------------------------- found by the fuzzer (seed 3)


def _example(name: str) -> str:
    return (ROOT / "site_examples" / name).read_text(encoding="utf-8")


@pytest.mark.parametrize("name, old, new, key", [
    # a denormal earphone impedance divided by zero in the detector
    ("backyard_inverted_l.toml", 'earphone = "high-impedance"', "earphone = 5e-324", "receiver.earphone"),
    # a separate primary without its coupling factor reached the tuning model
    ("rural_long_wire.toml", "coupling_factor = 0.3", "", "receiver.coupling_factor"),
    # a plan corner at 1e300 m overflowed inside the geometry library
    ("suburban_lot_service_line.toml", "[3, 20]]", "[3, 1e300]]", "plan.buildings[0].outline[3][1]"),
])
def test_fuzz_findings_are_refused_with_key(capsys, tmp_path, name, old, new, key):
    text = _example(name)
    assert old in text
    p = tmp_path / "found.toml"
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    for command in ("report", "layout"):
        code, out, err = run(capsys, command, str(p), "--json")
        if command == "layout" and code == 0:
            continue
        assert code == 2, (command, err)
        line = one_line(err)
        assert f"{key} = " in line, line


def test_wire_down_to_the_ground_keeps_its_length_in_the_ranges(capsys, tmp_path):
    # the uncertainty run moved the low end onto the feed end (a zero-length piece reached the models)
    # (a point just above the 1 cm floor and below the 2 cm feed gap: lifted to the gap)
    p = tmp_path / "down.toml"
    p.write_text(_example("portable_vertical_counterpoise.toml").replace("[0, 0, 7.0]", "[0, 0, 0.011]"), encoding="utf-8")
    code, out, err = run(capsys, "report", str(p), "--json")
    assert code == 0, err
    assert fz._nulls(json.loads(out)) == []
    # 5e-324 m is below the physical floor: refused naming the point
    p.write_text(_example("portable_vertical_counterpoise.toml").replace("[0, 0, 7.0]", "[0, 0, 5e-324]"), encoding="utf-8")
    code, out, err = run(capsys, "report", str(p), "--json")
    assert code == 2 and "runs[0].points[1] = [0, 0, 5e-324]: an aerial point lower than 1 cm" in one_line(err)


def test_arrays_nested_too_deeply_for_the_parser(capsys, tmp_path):
    # found by the fuzzer (seed 1): the TOML parser recursed past Python's limit -> internal error
    p = tmp_path / "deep.toml"
    p.write_text("deep = " + "[" * 3000 + "1" + "]" * 3000 + "\n", encoding="utf-8")
    code, _, err = run(capsys, "check", str(p))
    assert code == 2 and "nested too deeply" in one_line(err)
