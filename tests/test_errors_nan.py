"""pycore.errors: the NaN scan of guarded results, against a plain recursive reading of its rule."""

import math
from dataclasses import dataclass

from hypothesis import given, settings
from hypothesis import strategies as st

from pycore.errors import InputError, _has_nan, guarded


@dataclass(frozen=True)
class _Rec:
    a: object
    b: object


@dataclass
class _Slots:
    __slots__ = ("x",)
    x: object


def _ref(v, depth=0):
    # the rule: a NaN float or complex, in tuples, lists, dict values and dataclass fields nested
    # fewer than four deep, counts; text, whole numbers and anything else do not
    if isinstance(v, (float, complex)):
        return v != v
    if depth >= 4 or isinstance(v, (str, bytes, int)) or v is None:
        return False
    if isinstance(v, (tuple, list)):
        return any(_ref(x, depth + 1) for x in v)
    if isinstance(v, dict):
        return any(_ref(x, depth + 1) for x in v.values())
    if isinstance(v, (_Rec, _Slots)):
        return any(_ref(getattr(v, n), depth + 1) for n in v.__dataclass_fields__)
    return False


_leaves = st.one_of(st.floats(), st.integers(), st.integers(min_value=10**400, max_value=10**401), st.booleans(),
                    st.none(), st.text(max_size=3), st.complex_numbers(), st.just(math.nan), st.just(b"x"))
_values = st.recursive(
    _leaves,
    lambda inner: st.one_of(st.lists(inner, max_size=4), st.lists(inner, max_size=4).map(tuple),
                            st.dictionaries(st.text(max_size=2), inner, max_size=3),
                            st.builds(_Rec, inner, inner), st.builds(_Slots, inner)),
    max_leaves=12)


@settings(max_examples=600, deadline=None)
@given(_values)
def test_has_nan_is_the_rule(v):
    assert _has_nan(v) == _ref(v)


def test_has_nan_cases():
    assert _has_nan([1.0, 2, math.nan])
    assert not _has_nan(["a", 1, None, 10**400])
    assert _has_nan(["a", _Rec(1.0, (2.0, complex(math.nan, 0)))])
    assert _has_nan(_Slots([math.nan]))
    assert not _has_nan([[[[[math.nan]]]]])  # nested beyond the depth looked at
    assert _has_nan([[[[math.nan]]]])
    shared = _Rec(math.nan, 1)
    assert _has_nan([_Rec(shared, 2), _Rec(shared, 3)])
    # a record shared by a result: first met too deep for its NaN to count, then near the top, where it does
    deep = _Rec((math.nan,), 0)
    assert _has_nan(_Rec(_Rec(_Rec(deep, 0), 0), deep))
    assert not _has_nan(_Rec(_Rec(_Rec(deep, 0), 0), 1))


def test_guarded_refuses_a_nan_result():
    @guarded
    def f(x):
        return {"v": [x, "t"]}

    assert f(1.0) == {"v": [1.0, "t"]}
    try:
        f(math.nan)
    except InputError:
        pass
    else:
        raise AssertionError("a NaN result must raise InputError")
