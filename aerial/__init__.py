"""aerial: estimate how well a wire receiving aerial and its earth system will work.

The public API a notebook user calls is the same one the command line uses::

    from aerial import load_site, analyse
    site = load_site("site_examples/backyard_inverted_l.toml")
    result = analyse(site)          # a plain dict, the same as ``aerial report --json``

Frame: metres, x east, y north, z up; z = 0 is the ground surface.
"""

from aerial.core import threads as _threads

_threads.default_to_one_thread()  # before anything loads numpy; see aerial/core/threads.py

from aerial.core.version import __version__  # noqa: E402

from aerial.core.errors import AerialError, SiteError  # noqa: E402


def load_site(path):
    """Load and validate a site file (TOML). Raises :class:`SiteError` on bad input."""
    from aerial.site.reader import load_site as _load

    return _load(path)


def analyse(site, **options):
    """Run the whole chain for a loaded site and return the JSON-ready result dict."""
    from aerial.estimate.assemble import analyse as _analyse

    return _analyse(site, **options)


__all__ = ["AerialError", "SiteError", "load_site", "analyse", "__version__"]
