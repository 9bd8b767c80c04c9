"""The instrument: aperture, obstruction, focal length, eyepieces, camera."""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass, field

from planner.config.fields import APERTURE_MAX_MM, APERTURE_MIN_MM, TELESCOPE_KINDS, check
from planner.errors import InputError
from planner.units import ARCSEC_PER_RAD
from planner.units import convert_fields

__all__ = ["Telescope", "KINDS", "APERTURE_MIN_MM", "APERTURE_MAX_MM"]

#: the accepted apertures and telescope kinds have one home, the field table of planner.config.fields
KINDS = TELESCOPE_KINDS


@dataclass(frozen=True)
class Telescope:
    """A telescope, checked on creation.

    aperture_mm : clear aperture, 10-10000 mm
    obstruction : central obstruction as a diameter ratio, 0 <= eps < 1
        (a warning above 0.6, which is unusual)
    focal_length_mm : focal length (> 0) or None
    kind : optical type, one of :data:`KINDS`
    eyepieces_mm : focal lengths of the eyepieces at hand (> 0)
    pixel_um : camera pixel size (> 0) or None
    name : free text
    wavelength_nm : observing band, 550 nm (visual) by default, 200-5000 nm
    chance_params : the observer's own calibration of the chance curve with this
        telescope, as (key, value) pairs for :func:`planner.verdict.judge`
        (fitted from the observation log by :mod:`planner.plan.calibration`);
        empty = the published model
    """

    aperture_mm: float
    obstruction: float = 0.0
    focal_length_mm: float | None = None
    kind: str = "refractor"
    eyepieces_mm: tuple = field(default_factory=tuple)
    pixel_um: float | None = None
    name: str = ""
    wavelength_nm: float = 550.0
    chance_params: tuple = ()

    def __post_init__(self):
        convert_fields(self)  # astropy Quantity fields (4 * u.imperial.inch) to the unit of their name

        # aperture, obstruction, focal length, kind and wavelength: the field table's one validator
        def num(value, label, allowed):
            try:
                v = float(value)
            except (TypeError, ValueError):
                raise InputError(f"{label} = {value!r} is not a number; use {allowed}") from None
            if not math.isfinite(v):
                raise InputError(f"{label} = {value!r} is not allowed; use {allowed}")
            return v

        object.__setattr__(self, "aperture_mm", check("aperture_mm", self.aperture_mm, "aperture_mm"))
        eps = check("obstruction", self.obstruction, "obstruction")
        if eps > 0.6:
            warnings.warn(f"obstruction {eps:g} is unusually large (above 0.6); check it is a diameter ratio",
                          stacklevel=3)
        object.__setattr__(self, "obstruction", eps)
        if self.focal_length_mm is not None:
            object.__setattr__(self, "focal_length_mm", check("focal_mm", self.focal_length_mm, "focal_length_mm"))
        object.__setattr__(self, "kind", check("kind", self.kind, "kind"))
        eps_mm = self.eyepieces_mm
        if isinstance(eps_mm, (int, float)):
            eps_mm = (eps_mm,)
        eyes = tuple(num(e, "eyepiece focal length", "focal lengths in mm greater than 0") for e in eps_mm)
        if any(e <= 0 for e in eyes):
            raise InputError(f"eyepiece focal length {min(eyes):g} is not allowed; use focal lengths in mm "
                             "greater than 0")
        if eyes and self.focal_length_mm is None:
            raise InputError("eyepieces were given without focal_length_mm; give the telescope's focal length")
        object.__setattr__(self, "eyepieces_mm", tuple(sorted(eyes)))
        if self.pixel_um is not None:
            p = num(self.pixel_um, "pixel_um", "a pixel size in micrometres greater than 0")
            if p <= 0:
                raise InputError(f"pixel_um = {p:g} is not allowed; use a pixel size in micrometres greater than 0")
            object.__setattr__(self, "pixel_um", p)
        object.__setattr__(self, "wavelength_nm", check("wavelength_nm", self.wavelength_nm, "wavelength_nm"))

    @classmethod
    def from_mapping(cls, d, name: str = "") -> "Telescope":
        """Build a telescope from a profile, plan-file or command-line mapping.

        Keys: ``aperture_mm`` (required), ``obstruction``, ``kind``, ``focal_mm``,
        ``wavelength_nm`` and optionally ``name``; other keys (``note``) are
        ignored.  ``name`` wins over ``d["name"]``."""
        if d.get("aperture_mm") is None:
            raise InputError("a telescope needs an aperture in mm (--aperture 102)")
        kw = {"aperture_mm": d["aperture_mm"], "obstruction": d.get("obstruction"), "kind": d.get("kind"),
              "focal_length_mm": d.get("focal_mm"), "wavelength_nm": d.get("wavelength_nm")}
        return cls(name=name or d.get("name", ""), **{k: v for k, v in kw.items() if v is not None})

    # -- derived quantities -------------------------------------------------
    @property
    def focal_ratio(self) -> float | None:
        return None if self.focal_length_mm is None else self.focal_length_mm / self.aperture_mm

    @property
    def magnifications(self) -> tuple:
        """Powers given by the eyepieces at hand (highest last)."""
        if self.focal_length_mm is None:
            return ()
        return tuple(sorted(self.focal_length_mm / e for e in self.eyepieces_mm))

    @property
    def has_camera(self) -> bool:
        return self.pixel_um is not None and self.focal_length_mm is not None

    @property
    def pixel_scale_arcsec(self) -> float | None:
        """Sky angle of one camera pixel [arcsec] = 206.265 x pixel[um] / f[mm]."""
        if not self.has_camera:
            return None
        return self.pixel_um * 1e-3 / self.focal_length_mm * ARCSEC_PER_RAD

    def limit_arcsec(self, criterion: str = "dawes") -> float:
        """Classical equal-pair limit of this aperture at its wavelength."""
        from planner.optics.limits import limit_arcsec

        return float(limit_arcsec(self.aperture_mm, self.wavelength_nm, criterion))

    def airy_radius_um(self) -> float | None:
        """Radius of the first dark ring in the focal plane [um] (None without a focal length)."""
        if self.focal_length_mm is None:
            return None
        from planner.optics.limits import airy_radius_um

        return float(airy_radius_um(self.focal_length_mm, self.aperture_mm, self.wavelength_nm))
