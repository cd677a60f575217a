"""Records: named tuples written as ``class Name(NamedTuple):``, made for less at start-up.

aerial's results and site descriptions are named tuples (``Site``, ``Station``, ``TuningParts``...): a report
makes some sixty of these classes when its modules load. :class:`typing.NamedTuple` checks the annotation of
every field when it makes a class, which costs about a third of the making, and
:func:`collections.namedtuple` under it compiles a new ``__new__`` from source text for every class, which
costs most of the rest. The ``NamedTuple`` here is written the same way and makes the same class -- the
members :func:`collections.namedtuple` gives (``__new__`` taking the fields by position or name, with their
defaults, ``_make``, ``_replace``, ``_asdict``, ``__repr__``, ``__getnewargs__``, ``_fields``,
``_field_defaults``, ``__match_args__``, a read-only property per field), with the same names, documentation
and behaviour, plus the docstring and whatever else the class body defines (methods, properties, constants)
-- less those checks and compilations: ``__new__`` is one code per number of fields (written out here for up
to 13 fields, compiled once for more) renamed for each class, and the other methods are copies of one
function each. ``__annotations__`` holds the annotations as written. A type checker reads
:class:`typing.NamedTuple` itself, so a record's fields are typed as before.
tests/test_records.py checks the class against the one typing.NamedTuple makes.

>>> class Span(NamedTuple):
...     '''A wire between two supports. [m]'''
...     length_m: float
...     sag_m: float = 0.0
...
...     @property
...     def slack(self) -> bool:
...         return self.sag_m > 0.0
>>> Span(30.0), Span(30.0, sag_m=0.5).slack
(Span(length_m=30.0, sag_m=0.0), True)
>>> Span.__bases__, Span._fields, Span._field_defaults, Span.__doc__
((<class 'tuple'>,), ('length_m', 'sag_m'), {'sag_m': 0.0}, 'A wire between two supports. [m]')
"""

import sys
import types
import typing
from operator import itemgetter

try:
    from _collections import _tuplegetter  # the field property collections.namedtuple uses (CPython)
except ImportError:  # pragma: no cover - other Pythons: what collections.namedtuple falls back to
    def _tuplegetter(index, doc):
        return property(itemgetter(index), doc=doc)

#: Names a class body may not define: the named tuple's own machinery (as for typing.NamedTuple).
RESERVED_NAMES = frozenset({"_fields", "_replace", "_source", "_asdict", "__slots__", "_make", "__getnewargs__",
                            "__init__", "_field_defaults", "__new__"})
#: Names every class body has that the record does not take over from it (as for typing.NamedTuple).
CLASS_BODY_NAMES = frozenset({"__module__", "__annotations__", "__name__"})


#: ``__new__`` of a record of n fields, one code for each n: its arguments are renamed for each class. Those of up
#: to 13 fields are written out here, so they come compiled with this module (``compile`` takes about 0.1 ms a
#: text, 1.3 ms at a report's start-up when they were made there); one of more fields is compiled when first
#: needed. ``_tuple_new`` is looked up in the globals each ``__new__`` is given (:func:`_new_of`).
_tuple_new = tuple.__new__
_NEW_BY_COUNT: dict = {
    1: (lambda _cls, _0: _tuple_new(_cls, (_0,))).__code__,
    2: (lambda _cls, _0, _1: _tuple_new(_cls, (_0, _1))).__code__,
    3: (lambda _cls, _0, _1, _2: _tuple_new(_cls, (_0, _1, _2))).__code__,
    4: (lambda _cls, _0, _1, _2, _3: _tuple_new(_cls, (_0, _1, _2, _3))).__code__,
    5: (lambda _cls, _0, _1, _2, _3, _4: _tuple_new(_cls, (_0, _1, _2, _3, _4))).__code__,
    6: (lambda _cls, _0, _1, _2, _3, _4, _5: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5))).__code__,
    7: (lambda _cls, _0, _1, _2, _3, _4, _5, _6: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5, _6))).__code__,
    8: (lambda _cls, _0, _1, _2, _3, _4, _5, _6, _7: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5, _6, _7))).__code__,
    9: (lambda _cls, _0, _1, _2, _3, _4, _5, _6, _7, _8: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5, _6, _7, _8))).__code__,
    10: (lambda _cls, _0, _1, _2, _3, _4, _5, _6, _7, _8, _9: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5, _6, _7, _8, _9))).__code__,
    11: (lambda _cls, _0, _1, _2, _3, _4, _5, _6, _7, _8, _9, _10: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5, _6, _7, _8, _9, _10))).__code__,
    12: (lambda _cls, _0, _1, _2, _3, _4, _5, _6, _7, _8, _9, _10, _11: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5, _6, _7, _8, _9, _10, _11))).__code__,
    13: (lambda _cls, _0, _1, _2, _3, _4, _5, _6, _7, _8, _9, _10, _11, _12: _tuple_new(_cls, (_0, _1, _2, _3, _4, _5, _6, _7, _8, _9, _10, _11, _12))).__code__,
}


def new_code(count: int):
    """The code of ``lambda _cls, _0, _1, ...: _tuple_new(_cls, (_0, _1, ...))`` for ``count`` fields, compiled now."""
    args = ", ".join(f"_{i}" for i in range(count))
    return compile(f"lambda _cls, {args}: _tuple_new(_cls, ({args}{',' if count == 1 else ''}))", "<record>",
                   "eval").co_consts[0]


def _new_of(typename: str, field_names: tuple, defaults: tuple):
    """The record's ``__new__``: ``__new__(cls, field_1, field_2, ...)`` -> the tuple of the fields, as a class of it."""
    template = _NEW_BY_COUNT.get(len(field_names))
    if template is None:
        template = _NEW_BY_COUNT[len(field_names)] = new_code(len(field_names))
    space = {"_tuple_new": tuple.__new__, "__builtins__": {}, "__name__": f"namedtuple_{typename}"}
    new = types.FunctionType(template.replace(co_varnames=("_cls",) + field_names), space, "__new__", defaults)
    new.__qualname__ = f"{typename}.__new__"
    new.__doc__ = f"Create new instance of {typename}({', '.join(field_names)})"
    return new


def _make(cls, iterable):
    result = tuple.__new__(cls, iterable)
    if len(result) != len(cls._fields):
        raise TypeError(f"Expected {len(cls._fields)} arguments, got {len(result)}")
    return result


def _replace(self, /, **kwds):
    result = self._make(map(kwds.pop, self._fields, self))
    if kwds:
        raise ValueError(f"Got unexpected field names: {list(kwds)!r}")
    return result


def __repr__(self):
    'Return a nicely formatted representation string'
    return self.__class__.__name__ + "(" + ", ".join([f"{n}={v!r}" for n, v in zip(self._fields, self)]) + ")"


def _asdict(self):
    'Return a new dict which maps field names to their values.'
    return dict(zip(self._fields, self))


def __getnewargs__(self):
    'Return self as a plain tuple.  Used by copy and pickle.'
    return tuple(self)


def _method(fn, typename: str, doc: str | None = None):
    """A copy of ``fn`` named as a method of ``typename``, with ``doc`` (default: ``fn``'s own)."""
    method = types.FunctionType(fn.__code__, fn.__globals__, fn.__name__, fn.__defaults__, fn.__closure__)
    method.__qualname__ = f"{typename}.{fn.__name__}"
    method.__doc__ = fn.__doc__ if doc is None else doc
    return method


#: The read-only property of field number i, made once for each i and shared by every record.
_FIELD_DOCS: list = []


def record_class(typename: str, field_names: tuple, defaults: tuple, module: str) -> type:
    """The named-tuple class ``typename`` of ``field_names``, the last ``len(defaults)`` of them with ``defaults``.

    The class :func:`collections.namedtuple` makes from the same arguments (members, their names and
    documents, behaviour), made without compiling source text for it.

    >>> Point = record_class("Point", ("x", "y"), (0.0,), __name__)
    >>> p = Point(1.0)
    >>> p, p._replace(y=2.0), p._asdict(), Point._make([3, 4]), Point._field_defaults
    (Point(x=1.0, y=0.0), Point(x=1.0, y=2.0), {'x': 1.0, 'y': 0.0}, Point(x=3, y=4), {'y': 0.0})
    """
    field_names = tuple(map(sys.intern, field_names))
    for name in field_names:
        if name.startswith("_"):
            raise ValueError(f"Field names cannot start with an underscore: {name!r}")
    while len(_FIELD_DOCS) < len(field_names):
        _FIELD_DOCS.append(sys.intern(f"Alias for field number {len(_FIELD_DOCS)}"))
    space = {
        "__doc__": f"{typename}({', '.join(field_names)})",
        "__slots__": (),
        "_fields": field_names,
        "_field_defaults": dict(zip(field_names[len(field_names) - len(defaults):], defaults)),
        "__new__": _new_of(typename, field_names, defaults),
        "_make": classmethod(_method(_make, typename, f"Make a new {typename} object from a sequence or iterable")),
        "_replace": _method(_replace, typename,
                            f"Return a new {typename} object replacing specified fields with new values"),
        "__repr__": _method(__repr__, typename),
        "_asdict": _method(_asdict, typename),
        "__getnewargs__": _method(__getnewargs__, typename),
        "__match_args__": field_names,
    }
    for index, name in enumerate(field_names):
        space[name] = _tuplegetter(index, _FIELD_DOCS[index])
    record = type(typename, (tuple,), space)
    record.__module__ = module
    return record


class RecordMaker(type):
    """Makes a class written ``class Name(NamedTuple):`` as :class:`typing.NamedTuple` does, without its checks."""

    def __new__(mcs, typename, bases, namespace):
        if not bases:  # the NamedTuple base itself
            return super().__new__(mcs, typename, bases, namespace)
        if bases != (NamedTuple,):
            raise TypeError("a record can only inherit from NamedTuple")
        annotations = namespace.get("__annotations__", {})
        with_defaults = []
        for name in annotations:
            if name in namespace:
                with_defaults.append(name)
            elif with_defaults:
                raise TypeError(f"Non-default namedtuple field {name} cannot follow default field"
                                f"{'s' if len(with_defaults) > 1 else ''} {', '.join(with_defaults)}")
        record = record_class(typename, tuple(annotations), tuple(namespace[n] for n in with_defaults),
                              namespace["__module__"])
        record.__annotations__ = record.__new__.__annotations__ = dict(annotations)
        record.__orig_bases__ = (typing.NamedTuple,)  # where typing.get_original_bases finds it
        for key, value in namespace.items():
            if key in RESERVED_NAMES:
                raise AttributeError("Cannot overwrite NamedTuple attribute " + key)
            if key not in CLASS_BODY_NAMES and key not in record._fields:
                setattr(record, key, value)
        return record


if typing.TYPE_CHECKING:
    from typing import NamedTuple as NamedTuple
else:
    class NamedTuple(metaclass=RecordMaker):
        """Base of a record: ``class Name(NamedTuple):`` with annotated fields, as :class:`typing.NamedTuple`."""
