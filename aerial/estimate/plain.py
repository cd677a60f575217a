"""Plain JSON values from a result: numpy types to Python ones, non-finite numbers to null with a warning.

:func:`json_text` writes such a result as the command line prints it (``json.dumps`` with an indent of two),
the same text, faster.
"""

from __future__ import annotations

import json
import math
from json.encoder import c_make_encoder, encode_basestring_ascii

import numpy as np

from aerial.core.lengthtext import LengthText

#: numpy kinds whose ``tolist`` gives plain JSON values (float, int, unsigned, bool) at once.
PLAIN_KINDS = "fiub"


def finalise(result: dict) -> dict:
    """Turn numpy values into plain JSON types; any non-finite number becomes null with a warning."""
    try:
        return _plain(result)
    except _NonFinite:  # rare: walk again, noting where each null is
        pass
    bad: list[str] = []

    def clean(value, path):
        if isinstance(value, dict):
            return {k: clean(v, f"{path}.{k}" if path else k) for k, v in value.items()}
        if isinstance(value, (list, tuple)):
            return [clean(v, path) for v in value]
        if isinstance(value, np.ndarray):
            return clean(value.tolist(), path)
        if isinstance(value, (np.bool_, bool)):
            return bool(value)
        if isinstance(value, (np.integer,)):
            return int(value)
        if isinstance(value, (float, np.floating)):
            v = float(value)
            if not math.isfinite(v):
                bad.append(path)
                return None
            return v
        if isinstance(value, complex):
            return [clean(value.real, path), clean(value.imag, path)]
        return value

    out = clean(result, "")
    if bad:
        out.setdefault("warnings", []).append(
            "Some figures could not be computed and are shown as null: " + ", ".join(sorted(set(bad)))
        )
    return out


class _NonFinite(Exception):
    """A non-finite number met by :func:`_plain`."""


#: Types :func:`_plain` passes through as they are (``finalise`` gives them back unchanged): a
#: :class:`~aerial.core.lengthtext.LengthText` stays one, so the report can write its lengths in feet.
PASS_TYPES = frozenset({str, LengthText, int, bool, type(None)})


def _plain(value):
    """:func:`finalise`'s conversion for a result with no non-finite number (else raise ``_NonFinite``).

    The same values as the element-by-element walk, with the common types tested first and a numeric array
    converted in one ``tolist``.
    """
    t = type(value)
    if t is float:
        if not math.isfinite(value):
            raise _NonFinite
        return value
    if t in PASS_TYPES:
        return value
    if t is dict:
        return {k: _plain(v) for k, v in value.items()}
    if t is list or t is tuple:
        return [_plain(v) for v in value]
    if t is np.ndarray and value.dtype.kind in PLAIN_KINDS:
        if value.dtype.kind == "f" and not np.isfinite(value).all():
            raise _NonFinite
        return value.tolist()  # plain Python floats, ints and bools: what the element-by-element walk gives
    if isinstance(value, dict):
        return {k: _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, np.ndarray):
        return _plain(value.tolist())
    if isinstance(value, (np.bool_, bool)):
        return bool(value)
    if isinstance(value, (np.integer,)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        return _plain(float(value))
    if isinstance(value, complex):
        return [_plain(value.real), _plain(value.imag)]
    return value


class _NotPlain(Exception):
    """A value :func:`json_text` leaves to the standard library (a subclass, a non-finite number, ...)."""


def json_text(value) -> str:
    """``json.dumps(value, indent=2, allow_nan=False)``: the same text, written faster.

    Plain values (dict with str keys, list, tuple, str, int, float, bool, None) are written here, a list of
    floats in one join; anything else (a subclass, a non-finite number, a non-str key, a loop) is handed to
    ``json.dumps`` whole, so its text, or its error, is the standard library's.

    Examples
    --------
    >>> print(json_text({"a_m": [1.5, 2.0], "b": {"c": None, "d": [True, "x"]}, "e": []}))
    {
      "a_m": [
        1.5,
        2.0
      ],
      "b": {
        "c": null,
        "d": [
          true,
          "x"
        ]
      },
      "e": []
    }
    """
    parts: list[str] = []
    try:
        _write(value, parts, "\n")
    except (_NotPlain, RecursionError):
        return json.dumps(value, indent=2, allow_nan=False)
    return "".join(parts)


#: The types written as they stand; a dict or list holding only these is written by the standard library's
#: C encoder in one call, its items separated by a line break and the indent.
SCALAR_TYPES = frozenset({str, LengthText, float, int, bool, type(None)})
#: The one type of key written here (a dict with any other goes to ``json.dumps``).
KEY_TYPES = frozenset({str})
_encoders: dict = {}


def _not_plain(o):
    raise _NotPlain


def _encoder(inner: str):
    """A one-level encoder whose items are separated by ``","`` + ``inner`` (the C encoder where there is one)."""
    enc = _encoders.get(inner)
    if enc is None:
        if c_make_encoder is not None:
            # the standard library's own C encoder, as json.dumps builds it, with the indent in the separator
            c_enc = c_make_encoder(None, _not_plain, encode_basestring_ascii, None, ": ", "," + inner, False, False,
                                   False)
            enc = _encoders[inner] = lambda o: "".join(c_enc(o, 0))
        else:
            enc = _encoders[inner] = json.JSONEncoder(separators=("," + inner, ": "), allow_nan=False).encode
    return enc


def _flat_text(o, nl: str) -> str:
    """JSON text of a non-empty dict or list of scalars (str keys), indented as ``json.dumps(indent=2)`` does."""
    inner = nl + "  "
    try:
        text = _encoder(inner)(o)
    except ValueError:  # a non-finite number: the standard library's error, from json.dumps
        raise _NotPlain from None
    return text[0] + inner + text[1:-1] + nl + text[-1]


def _scalar_text(o) -> str:
    """JSON text of one value of :data:`SCALAR_TYPES` (``_NotPlain`` for a non-finite float)."""
    t = type(o)
    if t is str or t is LengthText:
        return encode_basestring_ascii(o)
    if t is float:
        text = float.__repr__(o)
        if "n" in text:  # inf, nan
            raise _NotPlain
        return text
    if o is None:
        return "null"
    if t is bool:
        return "true" if o else "false"
    return int.__repr__(o)


def _write(o, out: list, nl: str) -> None:
    """Append the JSON text of ``o`` to ``out``; ``nl`` is a line break and the current indent."""
    t = type(o)
    if t in SCALAR_TYPES:
        out.append(_scalar_text(o))
    elif t is dict:
        if not o:
            out.append("{}")
        elif SCALAR_TYPES.issuperset(map(type, o.values())) and KEY_TYPES.issuperset(map(type, o)):
            out.append(_flat_text(o, nl))
        else:
            inner = nl + "  "
            sep = "{" + inner
            for k, v in o.items():
                if type(k) is not str:
                    raise _NotPlain
                if type(v) in SCALAR_TYPES:  # most values: written here, without a call of _write
                    out.append(f"{sep}{encode_basestring_ascii(k)}: {_scalar_text(v)}")
                else:
                    out.append(f"{sep}{encode_basestring_ascii(k)}: ")
                    _write(v, out, inner)
                sep = "," + inner
            out.append(nl + "}")
    elif t is list or t is tuple:
        if not o:
            out.append("[]")
        elif SCALAR_TYPES.issuperset(map(type, o)):
            out.append(_flat_text(o, nl))
        else:
            inner = nl + "  "
            sep = "[" + inner
            for v in o:
                out.append(sep)
                _write(v, out, inner)
                sep = "," + inner
            out.append(nl + "]")
    else:
        raise _NotPlain
