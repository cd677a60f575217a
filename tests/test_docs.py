"""Every command has help and a docs entry; the command reference is not stale."""

from pathlib import Path

from aerial.clidoc import cli_markdown

ROOT = Path(__file__).resolve().parents[1]


def test_cli_reference_is_current():
    # regenerate with: python -m aerial.clidoc > docs/cli.md
    assert (ROOT / "docs" / "cli.md").read_text(encoding="utf-8") == cli_markdown()


def test_every_command_is_documented():
    text = (ROOT / "docs" / "cli.md").read_text(encoding="utf-8")
    for cmd in ("check", "report", "layout", "coil"):
        assert f"## aerial {cmd}" in text


def test_readme_opens_with_the_job_and_the_two_commands():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    first_para = text.split("\n\n")[1]
    assert "aerial" in first_para and "earth" in first_para
    assert "pip install -e . && aerial report" in text
    assert "pip install -e '.[test]' && python -m pytest" in text
    assert "local electrical codes and licensed practice" in text


def test_ci_runs_the_readme_test_command():
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    assert "pip install -e '.[test]' && python -m pytest" in ci


def test_docs_named_in_the_readme_exist():
    import re

    text = (ROOT / "README.md").read_text(encoding="utf-8")
    for link in re.findall(r"\]\((docs/[^)]+)\)", text):
        assert (ROOT / link).exists(), link
