"""``python -m aerial``: the same command line as ``aerial``."""

from aerial.cli import main

raise SystemExit(main())
