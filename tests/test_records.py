"""aerial.core.records.NamedTuple makes the class typing.NamedTuple makes (consistency check against the
standard library's :class:`typing.NamedTuple`, the reference for what a record is)."""

from __future__ import annotations

import pickle
import typing

import pytest

from aerial.core import records
from aerial.site.reader import Site, load_site

from .conftest import ROOT

BODY = '''
class Span({base}):
    """A wire between two supports. [m]"""

    length_m: float
    sag_m: float = 0.0
    names: tuple = ()

    LIMIT_M = 100.0

    @property
    def slack(self) -> bool:
        return self.sag_m > 0.0

    def longer(self, by_m: float) -> "Span":
        return self._replace(length_m=self.length_m + by_m)
'''


def _make(base):
    """The class of BODY made with ``base`` (typing's NamedTuple or ours), in a module of its own name."""
    space = {"__name__": "aerial_records_probe", "NamedTuple": base}
    exec(compile(BODY.format(base="NamedTuple"), "<probe>", "exec"), space)  # noqa: S102 - our own text
    return space["Span"]


def _described(cls):
    return {
        "bases": cls.__bases__, "mro": [c.__name__ for c in cls.__mro__], "type": type(cls),
        "fields": cls._fields, "defaults": cls._field_defaults, "new_defaults": cls.__new__.__defaults__,
        "doc": cls.__doc__, "module": cls.__module__, "name": cls.__name__, "qualname": cls.__qualname__,
        "annotations": list(cls.__annotations__), "members": sorted(vars(cls)), "orig_bases": cls.__orig_bases__,
        "field_doc": cls.length_m.__doc__, "new_doc": cls.__new__.__doc__, "slots": cls.__slots__,
    }


def test_consistency_a_record_is_the_class_typing_makes():
    theirs, ours = _make(typing.NamedTuple), _make(records.NamedTuple)
    assert _described(ours) == _described(theirs)
    a, b = theirs(30.0, names=("mast",)), ours(30.0, names=("mast",))
    assert (repr(a), a._asdict(), a.slack, tuple(a.longer(2.0))) == (repr(b), b._asdict(), b.slack, tuple(b.longer(2.0)))
    assert b == a and b.LIMIT_M == 100.0 and isinstance(b.longer(1.0), ours)


BAD_BODIES = {
    "Non-default namedtuple field sag_m cannot follow default field length_m":
        "class Bad(NamedTuple):\n    length_m: float = 1.0\n    sag_m: float\n",
    "Cannot overwrite NamedTuple attribute _make":
        "class Bad(NamedTuple):\n    length_m: float\n    def _make(self):\n        pass\n",
}


@pytest.mark.parametrize("base", [typing.NamedTuple, records.NamedTuple], ids=["typing", "records"])
def test_consistency_a_record_refuses_what_typing_refuses(base):
    with pytest.raises(TypeError, match=r"missing 1 required positional argument: 'length_m'"):
        _make(base)()
    for message, body in BAD_BODIES.items():
        with pytest.raises((TypeError, AttributeError), match=message):
            exec(compile(body, "<probe>", "exec"), {"__name__": "aerial_records_probe", "NamedTuple": base})


def test_consistency_a_site_stays_a_named_tuple_that_pickles():
    site = load_site(ROOT / "site_examples" / "backyard_inverted_l.toml")
    again = pickle.loads(pickle.dumps(site))
    assert type(again) is Site and Site.__bases__ == (tuple,) and again._fields == site._fields
    assert again.name == site.name and again._replace(name="x").name == "x"


def test_consistency_a_record_class_behaves_as_the_standard_librarys_named_tuple():
    # reference: collections.namedtuple (Python standard library), the class typing.NamedTuple is made from
    import collections

    theirs = collections.namedtuple("Mast", ["height_m", "guys", "note"], defaults=[3, None], module=__name__)
    ours = records.record_class("Mast", ("height_m", "guys", "note"), (3, None), __name__)
    for name in ("__new__", "_replace", "__repr__", "_asdict", "__getnewargs__"):
        a, b = getattr(theirs, name), getattr(ours, name)
        assert (a.__name__, a.__qualname__, a.__doc__) == (b.__name__, b.__qualname__, b.__doc__), name
    assert (theirs._make.__doc__, theirs._make.__qualname__) == (ours._make.__doc__, ours._make.__qualname__)
    assert theirs.__new__.__defaults__ == ours.__new__.__defaults__ and theirs.__doc__ == ours.__doc__
    assert [getattr(theirs, f).__doc__ for f in theirs._fields] == [getattr(ours, f).__doc__ for f in ours._fields]
    assert (theirs._fields, theirs._field_defaults, theirs.__match_args__) == (
        ours._fields, ours._field_defaults, ours.__match_args__)
    calls = [((9.5,), {}), ((9.5, 4), {"note": "x"}), ((), {"height_m": 2.0, "guys": 0}), ((1, 2, 3), {})]
    for args, kwargs in calls:
        a, b = theirs(*args, **kwargs), ours(*args, **kwargs)
        assert (tuple(a), repr(a), a._asdict(), a.__getnewargs__()) == (tuple(b), repr(b), b._asdict(), b.__getnewargs__())
        assert tuple(a._replace(guys=7)) == tuple(b._replace(guys=7)) and type(b._replace(guys=7)) is ours
    # the same errors, word for word
    bad = [lambda c: c(), lambda c: c(1, 2, 3, 4), lambda c: c(1, height_m=2), lambda c: c(1, mast=2),
           lambda c: c._make([1, 2]), lambda c: c(1)._replace(tall=2)]
    for call in bad:
        errors = []
        for cls in (theirs, ours):
            with pytest.raises((TypeError, ValueError)) as caught:
                call(cls)
            errors.append((type(caught.value), str(caught.value)))
        assert errors[0] == errors[1]
    with pytest.raises(ValueError, match="underscore"):
        records.record_class("Mast", ("_height",), (), __name__)


def test_consistency_the_written_out_new_is_the_compiled_one():
    # consistency check: each ``__new__`` written out in records.py is the code compile makes from its text
    for count in range(1, 14):
        written, compiled = records._NEW_BY_COUNT[count], records.new_code(count)
        assert (written.co_code, written.co_varnames, written.co_argcount, written.co_names, written.co_consts) == (
            compiled.co_code, compiled.co_varnames, compiled.co_argcount, compiled.co_names, compiled.co_consts), count
    big = records.record_class("Big", tuple(f"f{i}" for i in range(20)), (), __name__)
    assert tuple(big(*range(20))) == tuple(range(20)) and big(*range(20)).f19 == 19
