"""Safe writes: pictures and plan drawings go through a temporary file and a rename, never over a file without --force.

Every test hashes the example site files (and any output already present)
before and after each command. Sites are copies of the invented examples.
"""

from __future__ import annotations

import hashlib
import os
import shutil
from pathlib import Path

import pytest

from aerial.outputs import files
from aerial.core.errors import AerialError

from .conftest import EXAMPLES, ROOT, run

LOT = ROOT / "site_examples" / "suburban_lot_service_line.toml"
BACKYARD = ROOT / "site_examples" / "backyard_inverted_l.toml"


def digest(path: Path) -> dict:
    """sha256 of every file under ``path`` (or of the file itself), by relative name."""
    path = Path(path)
    if path.is_file():
        return {path.name: hashlib.sha256(path.read_bytes()).hexdigest()}
    if not path.exists():
        return {}
    return {str(p.relative_to(path)): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(path.rglob("*")) if p.is_file()}


@pytest.fixture(autouse=True)
def examples_untouched():
    before = {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in EXAMPLES}
    yield
    after = {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in EXAMPLES}
    assert after == before


def no_temporaries(folder: Path):
    assert not [p.name for p in Path(folder).iterdir() if p.name.endswith(".part")]


# --------------------------------------------------------------------------- report --pictures


def test_report_pictures_write_once_then_refuse_then_replace_with_force(capsys, tmp_path):
    site = tmp_path / "garden.toml"
    shutil.copy(BACKYARD, site)
    pics = tmp_path / "pics"
    site_hash = digest(site)

    code, _, err = run(capsys, "report", site, "--json", "--pictures", pics)
    assert code == 0, err
    first = digest(pics)
    assert set(first) == {"aerial-impedance.svg", "aerial-capacitance.svg", "tuning-range.svg", "station-power.svg",
                         "station-tuning.svg"}
    no_temporaries(pics)

    # again without --force: refused before any computing, nothing touched
    code, out, err = run(capsys, "report", site, "--json", "--pictures", pics)
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and "already exists; choose another name or add --force" in err
    assert digest(pics) == first

    # with --force: replaced (the same bytes: the drawing is deterministic), no temporaries left
    code, _, err = run(capsys, "report", site, "--json", "--pictures", pics, "--force")
    assert code == 0, err
    assert digest(pics) == first
    no_temporaries(pics)
    assert digest(site) == site_hash


def test_pictures_into_a_file_is_refused(capsys, tmp_path):
    target = tmp_path / "not-a-folder"
    target.write_text("keep me", encoding="utf-8")
    code, _, err = run(capsys, "report", BACKYARD, "--pictures", target, "--force")
    assert code == 2 and "is a file; expected a folder" in err
    assert target.read_text(encoding="utf-8") == "keep me"


def test_pictures_under_a_missing_folder_is_refused(capsys, tmp_path):
    code, _, err = run(capsys, "report", BACKYARD, "--pictures", tmp_path / "no" / "such")
    assert code == 2 and "does not exist" in err
    assert not (tmp_path / "no").exists()


def test_a_refused_site_writes_no_pictures(capsys, tmp_path):
    site = tmp_path / "bad.toml"
    site.write_text(BACKYARD.read_text(encoding="utf-8").replace('sag = "0.4 m"', 'sag = "40 m"'), encoding="utf-8")
    pics = tmp_path / "pics"
    code, _, _ = run(capsys, "report", site, "--pictures", pics)
    assert code == 2
    assert digest(pics) == {}


# --------------------------------------------------------------------------- layout --picture


def test_layout_picture_written_once_and_never_over_the_site(capsys, tmp_path):
    site = tmp_path / "lot.toml"
    shutil.copy(LOT, site)
    site_hash = digest(site)
    drawing = tmp_path / "plan.svg"

    code, _, err = run(capsys, "layout", site, "--json", "--picture", drawing)
    assert code == 0, err
    first = digest(drawing)
    assert drawing.read_text(encoding="utf-8").lstrip().startswith("<")
    no_temporaries(tmp_path)

    code, _, err = run(capsys, "layout", site, "--json", "--picture", drawing)
    assert code == 2 and "already exists" in err and err.count("\n") == 1
    assert digest(drawing) == first

    code, _, err = run(capsys, "layout", site, "--json", "--picture", drawing, "--force")
    assert code == 0, err
    assert digest(drawing) == first  # deterministic drawing

    # the site file itself as the picture: refused even with --force
    code, _, err = run(capsys, "layout", site, "--json", "--picture", site, "--force")
    assert code == 2 and err.count("\n") == 1
    assert digest(site) == site_hash
    no_temporaries(tmp_path)


# --------------------------------------------------------------------------- write_atomic itself


def test_failed_rename_keeps_the_old_file_and_leaves_no_temporary(tmp_path, monkeypatch):
    target = tmp_path / "out.svg"
    target.write_text("old", encoding="utf-8")

    def broken(*a, **k):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", broken)
    with pytest.raises(AerialError, match="no space left on the device"):  # one line for the user, exit 2
        files.write_atomic(target, "new", force=True)
    assert target.read_text(encoding="utf-8") == "old"
    no_temporaries(tmp_path)


def test_interrupt_while_writing_leaves_no_temporary(tmp_path, monkeypatch):
    target = tmp_path / "out.svg"

    def interrupted(fd):
        raise KeyboardInterrupt

    monkeypatch.setattr(os, "fsync", interrupted)
    with pytest.raises(KeyboardInterrupt):
        files.write_atomic(target, "new")
    assert not target.exists()
    no_temporaries(tmp_path)


def test_a_file_that_appears_meanwhile_is_not_replaced(tmp_path, monkeypatch):
    target = tmp_path / "out.svg"
    real_check = files.check_writable

    def check_then_someone_writes(path, force=False, protected=()):
        p = real_check(path, force, protected)
        Path(path).write_text("someone else's", encoding="utf-8")
        return p

    monkeypatch.setattr(files, "check_writable", check_then_someone_writes)
    with pytest.raises(AerialError, match="already exists"):
        files.write_atomic(target, "mine")
    assert target.read_text(encoding="utf-8") == "someone else's"
    no_temporaries(tmp_path)


def test_written_file_has_the_usual_permissions(tmp_path):
    mask = os.umask(0o022)
    try:
        files.write_atomic(tmp_path / "p.svg", "x")
    finally:
        os.umask(mask)
    assert (tmp_path / "p.svg").stat().st_mode & 0o777 == 0o644
