"""The one exception the core raises for input it cannot use, and the guard that keeps
arithmetic failures from escaping as anything else."""

import functools
import math


class InputError(ValueError):
    """Raised when a value cannot be parsed or lies outside what a method allows.

    The message is written for the person who typed the value: it says what was
    wrong and what would be accepted.
    """


OUT_OF_RANGE = (
    "These values are too large or too small to work with: check the units and the size of each value."
)


# what _has_nan does with a value of each exact type, worked out once per type (each check below
# looks at the type only): a number (NaN when unequal to itself), a leaf (text, whole numbers, None:
# nothing to scan), a sequence, a dict, or a dataclass
_NUMBER, _LEAF, _SEQUENCE, _DICT, _DATACLASS = range(5)
_KINDS: dict = {}
_ISNAN_TAKES: dict = {}  # type → whether math.isnan accepts its values (a float or an index)


def _kind(t):
    if issubclass(t, (float, complex)):
        return _NUMBER
    if issubclass(t, (str, bytes, int)) or t is type(None):
        return _LEAF
    if issubclass(t, (tuple, list)):
        return _SEQUENCE
    if issubclass(t, dict):
        return _DICT
    if hasattr(t, "__dataclass_fields__"):
        return _DATACLASS
    return None  # not decided by the type: an instance may carry the attribute itself


def _isnan_takes(t) -> bool:
    takes = _ISNAN_TAKES.get(t)
    if takes is None:
        takes = _ISNAN_TAKES[t] = hasattr(t, "__float__") or hasattr(t, "__index__")
    return takes


def _has_nan(value, depth: int = 0, seen: dict | None = None) -> bool:
    """True when a float, a complex, or a tuple/list/dict/dataclass of them holds NaN. A result that
    is itself a dataclass (a record of records, e.g. a bank of alike steps sharing their parts) notes
    in ``seen`` the depth each record inside it was looked at, and looks at a shared one again only
    from nearer the top."""
    t = type(value)
    kind = _KINDS.get(t)
    if kind is None:
        kind = _kind(t)
        if kind is None:
            if depth >= 4 or not hasattr(value, "__dataclass_fields__"):
                return False
            kind = _DATACLASS
        else:
            _KINDS[t] = kind
    if kind == _NUMBER:
        return value != value
    if kind == _LEAF or depth >= 4:
        return False
    if kind == _SEQUENCE:
        # a list of plain numbers (e.g. a load profile's 100 000 intervals) at C speed; one that starts
        # with a value math.isnan refuses (a record, text) goes straight to the loop
        if value and _isnan_takes(type(value[0])):
            try:
                return any(map(math.isnan, value))
            except (TypeError, OverflowError):  # complex, text, None, nested or huge ints: one by one
                pass
        items = value
    elif kind == _DICT:
        items = value.values()
    else:
        if depth == 0:
            seen = {}
        if seen is not None:
            at = seen.get(id(value))
            if at is not None and at <= depth:  # looked at from as near the top, no NaN (else the scan had ended)
                return False
            seen[id(value)] = depth
        d = getattr(value, "__dict__", None)  # a dataclass without slots holds its fields here
        items = d.values() if d is not None else [getattr(value, n) for n in value.__dataclass_fields__]
    # plain loops, no generators: the outermost guarded call scans every result it returns
    for v in items:
        t = type(v)
        if t is str or t is int or t is bool or v is None:  # the common leaves, without a call
            continue
        if t is float:
            if v != v:
                return True
        elif _has_nan(v, depth + 1, seen):
            return True
    return False


_depth = [0]  # guarded calls in progress (pycore runs on one thread, in CPython and in Pyodide)


def guarded(fn):
    """Decorator for public core functions: the contract is a value without NaN or an
    :class:`InputError`. Arithmetic that overflows or divides by zero on extreme finite
    input (ArithmeticError, or a math domain ValueError), or a result that holds NaN,
    becomes ``InputError(OUT_OF_RANGE)``; an InputError passes through unchanged."""

    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        _depth[0] += 1
        try:
            out = fn(*args, **kwargs)
        except InputError:
            raise
        except (ArithmeticError, ValueError):
            raise InputError(OUT_OF_RANGE) from None
        finally:
            _depth[0] -= 1
        # the outermost guarded call scans what it returns; a NaN made inside reaches it or is dropped,
        # so scanning every nested result too (a large share of a compute) would check nothing more
        if _depth[0] == 0 and _has_nan(out):
            raise InputError(OUT_OF_RANGE)
        return out

    return wrapper
