"""Refresh the screenshots of the shared page kept in docs/ (the first screen, as a browser shows it).

    python scripts/page_screenshots.py

Writes docs/page-report.png (``aerial report --page`` for the built-in example)
and docs/page-layout.png (``aerial layout --page`` for the suburban example),
each the first 1200 x 900 screen in headless Chromium (Debian packages
chromium and chromium-driver).
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from tests.browser import Browser, find_browser  # noqa: E402


def main() -> int:
    from aerial.api import run_layout, run_report

    if find_browser() is None:
        sys.stderr.write("no Chromium-family browser found: install the Debian packages chromium and chromium-driver\n")
        return 2
    with tempfile.TemporaryDirectory() as tmp:
        report, plan = Path(tmp) / "report.html", Path(tmp) / "plan.html"
        run_report(None, page=str(report))
        run_layout(str(ROOT / "site_examples" / "suburban_lot_service_line.toml"), page=str(plan))
        with Browser(width=1200, height=900) as b:
            for page, name in ((report, "page-report.png"), (plan, "page-layout.png")):
                b.open(page)
                problems = b.problems()
                if problems:
                    sys.stderr.write(f"{page.name}: " + "; ".join(problems) + "\n")
                    return 1
                (ROOT / "docs" / name).write_bytes(b.screenshot())
                print(f"docs/{name}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
