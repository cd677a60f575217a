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


def _tests_defined(path: Path) -> set[str]:
    """Test names in a test file: 'test_x' and 'TestClass::test_y'."""
    import ast

    tree = ast.parse(path.read_text(encoding="utf-8"))
    names = set()
    for node in tree.body:
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and node.name.startswith("test"):
            names.add(node.name)
        elif isinstance(node, ast.ClassDef):
            names.update(f"{node.name}::{m.name}" for m in node.body
                         if isinstance(m, (ast.FunctionDef, ast.AsyncFunctionDef)) and m.name.startswith("test"))
    return names


def test_every_validation_row_names_a_test_that_exists():
    # docs/validation.md: every table row names at least one test, as `tests/<file>.py::<name>` (or a test file
    # for the mutation table), and each named test exists
    import re

    rows = [line for line in (ROOT / "docs" / "validation.md").read_text(encoding="utf-8").splitlines()
            if line.startswith("|") and not re.match(r"^\|[\s|:-]+\|$", line)]
    body = [r for r in rows if not r.startswith("| check |") and not r.startswith("| mutant |")]
    assert len(body) > 50
    cache: dict[Path, set[str]] = {}
    for row in body:
        refs = re.findall(r"`(tests/[\w/]+\.py)(?:::([\w:]+))?`", row)
        assert refs, f"a validation row names no test: {row[:80]}"
        for file, name in refs:
            path = ROOT / file
            assert path.is_file(), f"{file} does not exist (row: {row[:60]})"
            if name:
                defined = cache.setdefault(path, _tests_defined(path))
                assert name in defined, f"{file}::{name} does not exist (row: {row[:60]})"
