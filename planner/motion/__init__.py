"""Motion of double stars: separation and position angle at any date.

* :func:`orbit_positions` -- rho, theta of ORB6 orbits at an epoch
  (Kepler + Thiele-Innes, precession of theta), module :mod:`.orbits`;
* :func:`orbit_grid` -- the same for many epochs at once;
* :func:`pair_geometry` -- per pair of a catalogue: rho, theta, method
  (orbit / linear / last measure), uncertainty, coordinates of date,
  module :mod:`.geometry`;
* :func:`solve_kepler` -- vectorised Kepler solver, module :mod:`.kepler`.

Epochs are Besselian years (see :mod:`.epochs`).  Submodules are imported
on first use so that importing the package stays cheap.
"""

from __future__ import annotations

_EXPORTS = {
    "orbit_positions": "planner.motion.orbits",
    "orbit_grid": "planner.motion.orbits",
    "thiele_innes": "planner.motion.orbits",
    "PRECESSION_MODELS": "planner.motion.orbits",
    "pair_geometry": "planner.motion.geometry",
    "linear_positions": "planner.motion.geometry",
    "apply_proper_motion": "planner.motion.geometry",
    "GRADE_FLOOR_FRACTION": "planner.motion.geometry",
    "solve_kepler": "planner.motion.kepler",
    "to_epoch_yr": "planner.motion.epochs",
    "today_epoch_yr": "planner.motion.epochs",
}

__all__ = sorted(_EXPORTS)


def __getattr__(name):
    if name in _EXPORTS:
        import importlib

        return getattr(importlib.import_module(_EXPORTS[name]), name)
    raise AttributeError(f"module 'planner.motion' has no attribute {name!r}")
