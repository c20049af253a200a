"""How the public physics functions treat odd input (the package docstring, "Odd input").

:func:`guard_public` wraps every function named in a module's ``__all__`` once, at the end of
that module: the body runs under ``numpy.errstate(all="ignore")``, so NaN, ±inf, zero,
negative or huge input never prints a NumPy RuntimeWarning (the IEEE result, NaN or ±inf,
is the documented outcome), and a Python float error (ZeroDivisionError, OverflowError,
FloatingPointError) of a scalar path becomes a ValueError naming the function. The wrapped
function keeps its name, signature and docstring. Results on valid input do not change.

:func:`check_index` bounds the integer parameters (harmonics, mode indices, grid sizes)
whose size sets the work a function does.
"""

from __future__ import annotations

import functools
import math
import numbers

import numpy as np

__all__ = ["guard_public", "check_index"]


def _guard(func):
    @functools.wraps(func)
    def guarded(*args, **kwargs):
        try:
            with np.errstate(all="ignore"):
                return func(*args, **kwargs)
        except (ZeroDivisionError, OverflowError, FloatingPointError) as exc:
            raise ValueError(f"{func.__name__}: input outside the domain of the formula "
                             f"({type(exc).__name__}: {exc})") from None

    guarded.__odd_input_guarded__ = True
    return guarded


def guard_public(namespace: dict) -> None:
    """Wrap every plain function listed in ``namespace["__all__"]`` (a module's globals).

    Cached parsers (``functools.lru_cache``: species and catalogue look-ups) are left as they
    are: they read text, not numbers."""
    for name in namespace.get("__all__", ()):
        obj = namespace.get(name)
        if (callable(obj) and getattr(obj, "__module__", None) == namespace["__name__"]
                and not isinstance(obj, type) and not hasattr(obj, "cache_info")
                and not getattr(obj, "__odd_input_guarded__", False)):
            namespace[name] = _guard(obj)


def check_index(name: str, value, low: int, high: int) -> int:
    """`value` as an int in [low, high], else ValueError (a NaN, inf or fractional value too)."""
    if isinstance(value, bool) or not isinstance(value, (numbers.Integral, numbers.Real)):
        raise TypeError(f"{name} must be an integer, got {type(value).__name__}")
    if not (math.isfinite(value) and float(value) == int(value)):
        raise ValueError(f"{name} must be a whole number, got {value!r}")
    if not low <= int(value) <= high:
        raise ValueError(f"{name} must lie between {low} and {high}, got {int(value)}")
    return int(value)
