"""Records: named tuples written as ``class Name(NamedTuple):``, made for less at start-up.

aerial's results and site descriptions are named tuples (``Site``, ``Station``, ``TuningParts``...): a report
makes some sixty of these classes when its modules load. :class:`typing.NamedTuple` checks the annotation of
every field when it makes a class, which costs about a third of the making. The ``NamedTuple`` here is
written the same way and makes the same class -- :func:`collections.namedtuple` with the fields in order,
their defaults, the docstring and whatever else the class body defines (methods, properties, constants) --
less those checks; ``__annotations__`` holds the annotations as written. A type checker reads
:class:`typing.NamedTuple` itself, so a record's fields are typed as before.

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

import collections
import typing

#: Names a class body may not define: the named tuple's own machinery (as for typing.NamedTuple).
RESERVED_NAMES = frozenset({"_fields", "_replace", "_source", "_asdict", "__slots__", "_make", "__getnewargs__",
                            "__init__", "_field_defaults", "__new__"})
#: Names every class body has that the record does not take over from it (as for typing.NamedTuple).
CLASS_BODY_NAMES = frozenset({"__module__", "__annotations__", "__name__"})


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
        record = collections.namedtuple(typename, list(annotations), defaults=[namespace[n] for n in with_defaults],
                                        module=namespace["__module__"])
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
