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


def _has_nan(value, depth: int = 0) -> bool:
    """True when a float, a complex, or a tuple/list/dict/dataclass of them holds NaN."""
    if isinstance(value, (float, complex)):
        return value != value
    if depth >= 4 or isinstance(value, (str, bytes, int)) or value is None:
        return False
    if isinstance(value, (tuple, list)):
        try:  # a list of plain numbers (e.g. a load profile's 100 000 intervals) at C speed
            return any(map(math.isnan, value))
        except (TypeError, OverflowError):  # complex, text, None, nested or huge ints: one by one
            items = value
    elif isinstance(value, dict):
        items = value.values()
    else:
        if not hasattr(value, "__dataclass_fields__"):
            return False
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
        elif _has_nan(v, depth + 1):
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
