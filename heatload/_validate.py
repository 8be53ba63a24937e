"""Input checks shared by the component modules (valves, pumps, motors,
actuators): numbers in, finite arrays out, or a :class:`HeatloadError` that
names the argument."""

from __future__ import annotations

import numpy as np

from heatload.errors import HeatloadError


def out(value):
    """A float for 0-d results, the array otherwise."""
    value = np.asarray(value, dtype=float)
    return float(value) if value.ndim == 0 else value


def as_array(value, name):
    """*value* as a float array, finite, else an error naming *name*."""
    try:
        a = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise HeatloadError(f"expected a number, got {value!r}", field=name) from None
    if not np.all(np.isfinite(a)):
        raise HeatloadError("expected a finite number (not NaN or infinite)", field=name)
    return a


def show(a):
    """The offending value(s) for a message."""
    a = np.asarray(a)
    return f"{float(a):g}" if a.ndim == 0 else f"values down to {float(np.min(a)):g}"


def positive(value, name):
    a = as_array(value, name)
    if np.any(a <= 0):
        raise HeatloadError(f"must be > 0, got {show(a)}", field=name)
    return a


def non_negative(value, name):
    a = as_array(value, name)
    if np.any(a < 0):
        raise HeatloadError(f"must be >= 0, got {show(a)}", field=name)
    return a


def efficiency(value, name):
    """An efficiency: a fraction in (0, 1]."""
    a = as_array(value, name)
    bad = (a <= 0) | (a > 1)
    if np.any(bad):
        raise HeatloadError(
            "must be an efficiency in (0, 1] (a fraction, not per cent), got "
            f"{float(np.ravel(a[bad] if a.ndim else a)[0]):g}", field=name)
    return a
