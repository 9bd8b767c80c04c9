"""Optics: diffraction limits, the obstructed Airy pattern, seeing, the
separability table and the limiting magnitude.

Light on import (numpy and scipy are loaded by the sub-modules only when a
function is called).  Public entry points:

* :func:`rayleigh_limit_arcsec`, :func:`dawes_limit_arcsec`,
  :func:`sparrow_limit_arcsec`, :func:`limit_arcsec`, :data:`LIMIT_MODELS`
* :func:`airy_radius_um`
* :func:`required_separation_arcsec` (models in :data:`SEPARATION_MODELS`)
* :func:`limiting_magnitude` (models in :data:`MAG_LIMIT_MODELS`)
* :class:`Telescope`
"""

from __future__ import annotations

__all__ = [
    "LIMIT_MODELS", "MAG_LIMIT_MODELS", "SEPARATION_MODELS", "Telescope",
    "airy_radius_um", "dawes_limit_arcsec", "limit_arcsec", "limiting_magnitude",
    "rayleigh_limit_arcsec", "required_separation_arcsec", "seeing_fwhm_arcsec",
    "sparrow_limit_arcsec",
]

_WHERE = {
    "LIMIT_MODELS": "limits", "airy_radius_um": "limits", "dawes_limit_arcsec": "limits",
    "limit_arcsec": "limits", "rayleigh_limit_arcsec": "limits", "sparrow_limit_arcsec": "limits",
    "MAG_LIMIT_MODELS": "visibility_limit", "limiting_magnitude": "visibility_limit",
    "SEPARATION_MODELS": "rules", "required_separation_arcsec": "rules",
    "seeing_fwhm_arcsec": "seeing", "Telescope": "telescope",
}


def __getattr__(name):
    # lazy: `import planner.optics` stays cheap for the command line
    if name in _WHERE:
        import importlib

        mod = importlib.import_module(f"planner.optics.{_WHERE[name]}")
        return getattr(mod, name)
    raise AttributeError(f"module 'planner.optics' has no attribute {name!r}")


def __dir__():
    return sorted(list(globals()) + __all__)
