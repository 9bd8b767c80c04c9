"""astropy units at the public edges: the one home of the unit-suffix convention.

Inside the package quantities are plain floats in the unit their name ends
with (``aperture_mm``, ``alt_deg``, ``seeing_arcsec`` ...).  A caller may hand
an astropy ``Quantity`` to any public function instead: :func:`value_in`
converts it to the unit of the name, or refuses it with one clear
:class:`~planner.errors.InputError` when it is not convertible (a time given
for a length).  ``Quantity`` is never read as a bare number in the wrong unit.
:func:`accepts_quantities` applies the rule to every suffixed argument of a
function, from its parameter names.  astropy is imported only when a
``Quantity`` actually arrives.
"""

from __future__ import annotations

import functools
import inspect
import math

from planner.errors import InputError

#: arcseconds per radian, 180 x 3600 / pi = 206264.806... (the one home of this conversion)
ARCSEC_PER_RAD = 180.0 * 3600.0 / math.pi

#: name suffix -> astropy unit string (the suffixes of planner/schema.py and DEVELOPERS.md)
SUFFIX_UNITS = {
    "_mm": "mm", "_um": "um", "_nm": "nm", "_m": "m", "_km": "km",
    "_deg": "deg", "_rad": "rad", "_arcmin": "arcmin", "_arcsec": "arcsec", "_mas": "mas",
    "_masyr": "mas / yr", "_hpa": "hPa", "_c": "deg_C", "_yr": "yr", "_min": "min", "_s": "s",
}


def is_quantity(x) -> bool:
    """True for an astropy ``Quantity`` (without importing astropy)."""
    return hasattr(x, "unit") and hasattr(x, "to_value")


def unit_of(name: str) -> str | None:
    """The astropy unit string a parameter name's suffix stands for, or None."""
    low = name.lower()
    if low.startswith("mag") or low.endswith("mag_arcsec2") or "_per_" in low:
        return None
    for suffix in sorted(SUFFIX_UNITS, key=len, reverse=True):
        if low.endswith(suffix):
            return SUFFIX_UNITS[suffix]
    return None


def value_in(x, unit: str | None, name: str = "value"):
    """``x`` as a plain number/array in ``unit``.

    A ``Quantity`` is converted (temperatures with astropy's temperature
    equivalency); one that cannot be converted is refused with an
    :class:`InputError` naming the argument and the unit expected.  With
    ``unit=None`` (a pure number such as an airmass or a magnitude) only a
    dimensionless ``Quantity`` is accepted.  Anything else is returned as is.
    """
    if not is_quantity(x):
        return x
    from astropy import units as u

    target = u.dimensionless_unscaled if unit is None else u.Unit(unit)
    try:
        if target.physical_type == "temperature":
            return x.to_value(target, equivalencies=u.temperature())
        return x.to_value(target)
    except u.UnitsError:
        what = "a plain number" if unit is None else f"a quantity convertible to {unit}"
        raise InputError(f"{name} = {x} is not {what} (its unit is {x.unit})") from None


def accepts_quantities(fn=None, *, units: dict | None = None):
    """Decorator: convert every ``Quantity`` argument of ``fn`` to the unit of its parameter
    name's suffix (:data:`SUFFIX_UNITS`), or to the unit given in ``units`` (``{"name": unit}``;
    ``None`` = a pure number).  A ``Quantity`` for a parameter without a unit is accepted only
    when dimensionless.  Plain numbers pass untouched, at the cost of one attribute check."""
    if fn is None:
        return functools.partial(accepts_quantities, units=units)
    sig = inspect.signature(fn)
    names = list(sig.parameters)
    want = {n: (units[n] if units and n in units else unit_of(n)) for n in names}

    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        if not (any(is_quantity(a) for a in args) or any(is_quantity(v) for v in kwargs.values())):
            return fn(*args, **kwargs)
        args = list(args)
        for i, a in enumerate(args):
            if is_quantity(a) and i < len(names):
                args[i] = value_in(a, want[names[i]], names[i])
        for k, v in list(kwargs.items()):
            if is_quantity(v):
                kwargs[k] = value_in(v, want.get(k, unit_of(k)), k)
        return fn(*args, **kwargs)

    return wrapper


def mapping_values(d: dict) -> dict:
    """A copy of a settings mapping (site, scope) with every ``Quantity`` value converted by its
    key's suffix (``{"aperture_mm": 4 * u.imperial.inch}`` -> 101.6)."""
    return {k: (value_in(v, unit_of(k), k) if is_quantity(v) else v) for k, v in dict(d).items()}


def wrap_public(namespace: dict) -> None:
    """Apply :func:`accepts_quantities` to every public function defined in a module that has a
    unit-suffixed parameter; called once at the end of the module (``wrap_public(globals())``), so
    the module's whole public surface accepts ``Quantity`` arguments."""
    mod = namespace.get("__name__")
    for name, fn in list(namespace.items()):
        if name.startswith("_") or not inspect.isfunction(fn) or fn.__module__ != mod:
            continue
        if getattr(fn, "__wrapped__", None) is not None:
            continue
        try:
            params = inspect.signature(fn).parameters
        except (TypeError, ValueError):
            continue
        if any(unit_of(p) for p in params):
            namespace[name] = accepts_quantities(fn)


def convert_fields(obj) -> None:
    """Convert, in place, every ``Quantity`` field of a (frozen) dataclass instance by its field
    name's suffix; for ``__post_init__`` of the typed objects built at the edge (Site, Telescope)."""
    import dataclasses

    for f in dataclasses.fields(obj):
        v = getattr(obj, f.name, None)
        if is_quantity(v):
            object.__setattr__(obj, f.name, value_in(v, unit_of(f.name), f.name))
