"""The ``aerial`` command and ``python -m aerial``.

Ctrl-C is handled from the first line that runs here, before the command
line and the numerical libraries load: at any moment it ends the program
with ``aerial: interrupted`` and exit code 130, and nothing half-made is left
(files are written through a temporary name, see :mod:`aerial.outputs.files`).
"""

import os
import signal
import sys

EXIT_INTERRUPTED = 130


def _stop_now(signum, frame):  # pragma: no cover - runs in a separate process
    """Ctrl-C while starting up or shutting down: nothing is open yet (or any more), so stop at once."""
    try:
        os.write(2, b"aerial: interrupted\n")
    except OSError:
        pass
    os._exit(EXIT_INTERRUPTED)


def run():  # pragma: no cover - exercised through real processes in tests/test_interrupt.py
    """Entry point of the console script."""
    signal.signal(signal.SIGINT, _stop_now)
    from aerial import cli  # the heavy part of start-up

    signal.signal(signal.SIGINT, cli.raise_interrupt)
    try:
        code = cli.main()
    except KeyboardInterrupt:
        code = cli.interrupted()
    signal.signal(signal.SIGINT, _stop_now)
    code = cli.flush_output(code)
    sys.exit(code)


if __name__ == "__main__":  # pragma: no cover
    run()
