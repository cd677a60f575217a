"""An SVG canvas for the charts that measures each piece of text once per process, drawing the same SVG.

matplotlib measures text through the renderer that draws it, and it makes a new renderer for every
figure saved (and one more for a layout pass), so the same tick labels, titles and legend words were
measured again for every chart: about a millisecond a string, and longer for the mathtext of a
logarithmic axis. :class:`MeasuringSVGCanvas` writes the SVG exactly as matplotlib's own SVG canvas
does, with a renderer that keeps its text measurements, its parsed mathtext and its fonts' line
heights in a store shared by every chart of the process. The store is keyed by the string, the font
properties and every ``font.*``, ``mathtext.*`` and ``text.*`` setting in force, so a change of
settings starts a fresh store; the SVG written is the same, byte for byte.
"""

from __future__ import annotations

import codecs

#: Font settings fingerprint -> (TextToPath, {(string, mathtext, FontProperties): (width, height, descent)},
#: {(FontProperties, dpi): (ascent, descent, line gap)}). A few entries at most (cleared past _MAX_SETTINGS).
_STORES: dict = {}
_MAX_SETTINGS = 8
#: Measurements kept per store before it is emptied (a long-running process drawing many sites).
_MAX_SIZES = 20000


def _font_settings() -> tuple:
    """The settings that can change how a string measures: every ``font.*``, ``mathtext.*``, ``text.*`` value."""
    import matplotlib

    rc = matplotlib.rcParams
    return tuple((k, repr(rc[k])) for k in sorted(rc) if k.startswith(("font.", "mathtext.", "text.")))


def _store(text2path):
    """The shared store for the settings in force (made with ``text2path`` when new)."""
    key = _font_settings()
    store = _STORES.get(key)
    if store is None:
        if len(_STORES) >= _MAX_SETTINGS:
            _STORES.clear()
        store = _STORES[key] = (text2path, {}, {})
    if len(store[1]) > _MAX_SIZES:
        store[1].clear()
        store[2].clear()
    return store


def _renderer_class():
    from matplotlib.backends.backend_svg import RendererSVG

    class MeasuringRendererSVG(RendererSVG):
        """matplotlib's SVG renderer whose text measurements and parsed mathtext are shared across figures."""

        def __init__(self, *args, figure=None, **kwargs):
            super().__init__(*args, **kwargs)
            self._text2path, self._sizes, self._heights = _store(self._text2path)
            self._figure = figure

        def get_text_width_height_descent(self, s, prop, ismath):
            if ismath == "TeX":
                return super().get_text_width_height_descent(s, prop, ismath)
            key = (s, ismath, prop.copy())
            size = self._sizes.get(key)
            if size is None:
                size = self._sizes[key] = super().get_text_width_height_descent(s, prop, ismath)
            return size

        def _get_font_height_metrics(self, prop):
            """A font's ascent, descent and line gap at the figure's resolution, as ``Text._get_layout`` works
            them out from the font's tables (None, None, None: let it measure)."""
            dpi = self._figure.dpi if self._figure is not None else None
            key = (prop.copy(), dpi)
            found = self._heights.get(key)
            if found is None:
                found = self._heights[key] = _font_height_metrics(prop, dpi)
            return found

    return MeasuringRendererSVG


def _font_height_metrics(prop, dpi) -> tuple:
    """The same arithmetic as matplotlib's ``Text._get_layout`` on the font's OS/2 or hhea table."""
    if dpi is None:
        return None, None, None
    from matplotlib.font_manager import fontManager, get_font

    font = get_font(fontManager._find_fonts_by_props(prop))
    for table_name, linegap_key, ascent_key, descent_key in (
            ("OS/2", "sTypoLineGap", "sTypoAscender", "sTypoDescender"), ("hhea", "lineGap", "ascent", "descent")):
        table = font.get_sfnt_table(table_name)
        if table is None:
            continue
        fontsize = prop.get_size_in_points()
        units_per_em = font.get_sfnt_table("head")["unitsPerEm"]
        scale = 1 / units_per_em * fontsize * dpi / 72
        return table[ascent_key] * scale, -table[descent_key] * scale, table[linegap_key] * scale
    return None, None, None


_CANVAS = None


def measuring_svg_canvas(fig):
    """Put a :class:`MeasuringSVGCanvas` on ``fig`` (as matplotlib's ``savefig`` puts its SVG canvas) and return it."""
    global _CANVAS
    if _CANVAS is None:
        _CANVAS = _canvas_class()
    return _CANVAS(fig)


def _canvas_class():
    from matplotlib import cbook
    from matplotlib.backends.backend_mixed import MixedModeRenderer
    from matplotlib.backends.backend_svg import FigureCanvasSVG

    renderer_class = _renderer_class()

    class MeasuringSVGCanvas(FigureCanvasSVG):
        """matplotlib's SVG canvas drawing through :class:`MeasuringRendererSVG` (the same SVG)."""

        def print_svg(self, filename, *, bbox_inches_restore=None, metadata=None, **_unused):
            # as FigureCanvasSVG.print_svg, with the measuring renderer; savefig's dpi, facecolor, edgecolor
            # and orientation arguments are dropped, as matplotlib drops them for its own SVG canvas
            with cbook.open_file_cm(filename, "w", encoding="utf-8") as fh:
                if not cbook.file_requires_unicode(fh):
                    fh = codecs.getwriter("utf-8")(fh)
                dpi = self.figure.dpi
                self.figure.dpi = 72
                width, height = self.figure.get_size_inches()
                w, h = width * 72, height * 72
                renderer = MixedModeRenderer(
                    self.figure, width, height, dpi,
                    renderer_class(w, h, fh, image_dpi=dpi, metadata=metadata, figure=self.figure),
                    bbox_inches_restore=bbox_inches_restore)
                self.figure.draw(renderer)
                renderer.finalize()

    return MeasuringSVGCanvas
