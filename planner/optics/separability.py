"""Physical model: how wide must a pair be to show as two stars?

The image of two point sources is modelled along the line that joins them:

    I(x) = B(|x|) + f B(|x - rho|),     f = 10^(-0.4 dm)

where ``B`` is the radial profile of one star's image: the Airy pattern of an
annular pupil (central obstruction ``eps``; Airy 1835, Born & Wolf 8.5)
convolved with the atmosphere.  ``B`` is computed as the Hankel transform of
the product of two transfer functions:

* the pupil's optical transfer function (autocorrelation of the annulus,
  closed form from the overlap areas of circles), and
* the long-exposure Kolmogorov transfer function exp(-3.44 (nu D/r0)^(5/3))
  (Fried 1966), whose image FWHM is 0.98 lambda/r0 (Dierickx 1992).

**Steady moments.**  An eye at the eyepiece catches moments of better air; the
long-exposure blur is pessimistic for visual work.  The kernel used is the
Kolmogorov long-exposure shape with its FWHM multiplied by
``steady_fraction`` k (default 0.6, an assumption inside the 0.5-0.7 range
suggested in docs/methods.md section 3; to be fitted to observers' logs).
Dispersion, when given, is added to that blur in quadrature (an isotropic,
crude stand-in for a blur that is really along the vertical).

**When is a pair split?**  Both of

1. *dip*: the profile has a separate maximum on the companion's side of the
   midpoint, and the lowest point between the two maxima lies at least
   ``delta`` below the fainter maximum (1 - I_min / I_max2 >= delta); and
2. *contrast*: the companion's own peak is at least ``contrast`` times the
   brightest part of the primary's pattern at or beyond the companion's
   distance (rings and seeing halo; upper envelope B_env(rho) = max over
   r >= rho of B(r)):  f >= contrast * B_env(rho).  Default contrast = 2:
   the companion must at least double the light of the primary's pattern
   where it sits (an assumption of this project, to be fitted).

**Calibration.**  ``delta`` is chosen so that an equal pair through a clear
aperture in perfect air is split exactly at the classical separation the user
selects: 3.19 % for Dawes (the dip at 115.8"/D, i.e. 1.021 lambda/D at 550 nm),
26.5 % for Rayleigh (1.2197 lambda/D), 0 for Sparrow (0.9472 lambda/D; a dip of
any depth).  The tabulated separations are then divided by the table's own
value at (dm = 0, eps = 0, no seeing), so the classical figure is reproduced
exactly, and multiplied by the classical limit in arcsec.  The residual grid
correction this removes is below 1 %.

**Required separation** for a cell is the smallest separation beyond which the
pair is split at every larger separation on the grid (so a companion that
happens to sit in a dark ring does not count).  **Monotone by construction**:
after the search, the table is replaced by its cumulative maximum along the
dm axis and then along the seeing axis, so the required separation never
decreases as dm, seeing or airmass grow (multilinear interpolation of a
table monotone along each axis stays monotone).

Table axes: dm (0-12 mag), eps (0-0.9), seeing FWHM in lambda/D (0-64).
Beyond 64 lambda/D the separation is scaled linearly with the blur (the seeing
dominates); dm above 12 is judged as 12 and eps above 0.9 as 0.9.
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np

from planner.errors import InputError
from planner.optics.limits import (
    DAWES_ARCSEC_MM,
    LIMIT_MODELS,
    RAYLEIGH_LOD,
    SPARROW_LOD,
    check_criterion,
    lod_arcsec,
)
from planner.optics.seeing import kolmogorov_mtf, seeing_fwhm_arcsec
from planner.units import wrap_public

TABLE_FILE = "separability_table.npz"
TABLE_VERSION = 1

#: default axes of the shipped table
DM_AXIS = np.concatenate([np.arange(0.0, 3.0, 0.25), np.arange(3.0, 12.01, 0.5)])
EPS_AXIS = np.array([0.0, 0.1, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5, 0.6, 0.7, 0.8, 0.9])
SEEING_AXIS = np.array([0.0, 0.25, 0.5, 0.75, 1.0, 1.25, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0,
                        8.0, 10.0, 13.0, 16.0, 20.0, 25.0, 32.0, 40.0, 50.0, 64.0])
CRITERIA = ("dawes", "rayleigh", "sparrow")

#: default parameters of the split criterion (see module docstring)
DEFAULT_CONTRAST = 2.0
DEFAULT_STEADY_FRACTION = 0.6

# -- grids used to search a cell -------------------------------------------
_R_STEP = 0.02      # radial profile step, in units of s = max(1, seeing FWHM)
_R_MAX = 34.0       # radial profile extent, s
_RHO_MIN = 0.5      # separation grid start, s
_RHO_MAX = 30.0     # separation grid end, s
_RHO_RATIO = 1.01   # separation grid: 1 % steps
_N_NU = 1500        # frequency samples of the Hankel transform


def calibration_target_lod(criterion: str) -> float:
    """Equal-pair, clear-aperture, perfect-seeing separation (lambda/D) a criterion must give.

    Dawes is tied to 550 nm: 115.8"/D[mm] = 1.021 lambda/D.
    """
    key = check_criterion(criterion)
    if key == "rayleigh":
        return RAYLEIGH_LOD
    if key == "sparrow":
        return SPARROW_LOD
    return DAWES_ARCSEC_MM / float(lod_arcsec(1.0, 550.0))


def dip_threshold(criterion: str) -> float:
    """Dip depth that defines a split under ``criterion`` (calibrated, see module doc)."""
    from planner.optics.limits import midpoint_dip

    key = check_criterion(criterion)
    if key == "sparrow":
        return 0.0
    return midpoint_dip(calibration_target_lod(key))


# --------------------------------------------------------------------------
# one star's image
# --------------------------------------------------------------------------

def _overlap(a, b, d):
    """Area of the intersection of two discs of radii a, b at centre distance d."""
    d = np.asarray(d, dtype=float)
    out = np.zeros_like(d)
    full = d <= abs(a - b)
    out[full] = np.pi * min(a, b) ** 2
    part = (d > abs(a - b)) & (d < a + b)
    dd = d[part]
    with np.errstate(invalid="ignore"):
        t1 = a**2 * np.arccos(np.clip((dd**2 + a**2 - b**2) / (2 * dd * a), -1, 1))
        t2 = b**2 * np.arccos(np.clip((dd**2 + b**2 - a**2) / (2 * dd * b), -1, 1))
        t3 = 0.5 * np.sqrt(np.clip((-dd + a + b) * (dd + a - b) * (dd - a + b) * (dd + a + b), 0, None))
    out[part] = t1 + t2 - t3
    return out


def pupil_otf(nu, obstruction=0.0):
    """Optical transfer function of an annular pupil at normalised frequency ``nu`` (D/lambda).

    Autocorrelation of the annulus (outer radius 1, inner eps) at shift 2 nu,
    normalised to 1 at nu = 0 (Born & Wolf 9.5).
    """
    eps = float(obstruction)
    d = 2.0 * np.asarray(nu, dtype=float)
    area = _overlap(1.0, 1.0, d)
    if eps > 0:
        area = area - 2.0 * _overlap(1.0, eps, d) + _overlap(eps, eps, d)
    return area / (np.pi * (1.0 - eps**2))


def _kernel(r_lod, seeing_lod):
    """Frequency grid, weights and J0 matrix for the Hankel transform."""
    from scipy.special import j0

    nu_max = 1.0 if seeing_lod <= 0 else min(1.0, 3.5 / seeing_lod)
    nu = np.linspace(0.0, nu_max, _N_NU)
    w = np.full(nu.size, nu[1] - nu[0])
    w[0] = w[-1] = 0.5 * (nu[1] - nu[0])
    k = j0(2.0 * np.pi * np.outer(r_lod, nu)) * (nu * w)
    return nu, k, nu * w


def star_profile(r_lod, obstruction=0.0, seeing_lod=0.0, _kernel_cache=None):
    """Radial profile of one star's image (peak = 1) at radii ``r_lod`` (lambda/D).

    Airy pattern of the annular pupil blurred by a Kolmogorov long-exposure
    kernel of FWHM ``seeing_lod`` (lambda/D); see the module docstring.
    """
    r = np.atleast_1d(np.asarray(r_lod, dtype=float))
    nu, k, weights = _kernel_cache if _kernel_cache is not None else _kernel(r, seeing_lod)
    t = pupil_otf(nu, obstruction)
    if seeing_lod > 0:
        t = t * kolmogorov_mtf(nu, seeing_lod)
    return (k @ t) / (weights @ t)


# --------------------------------------------------------------------------
# the split criterion on a grid of separations
# --------------------------------------------------------------------------

def _cell_margins(r, prof, s, flux):
    """Dip depth and contrast ratio on the separation grid for one (eps, seeing).

    Returns ``rho`` (lambda/D), ``dip`` (nf, nrho; NaN where no separate maximum)
    and ``ratio`` = f / B_env(rho) (nf, nrho).
    """
    nrho = int(np.floor(np.log(_RHO_MAX / _RHO_MIN) / np.log(_RHO_RATIO))) + 1
    rho = _RHO_MIN * s * _RHO_RATIO ** np.arange(nrho)
    # sample points along the line: primary neighbourhood, coarse middle, companion neighbourhood
    u_coarse = np.linspace(0.0, 1.0, 101)
    t_prim = np.linspace(-0.3, 0.6, 41) * s
    t_comp = np.linspace(-0.5, 0.5, 61) * s
    x = np.concatenate([
        rho[:, None] * u_coarse[None, :],
        np.broadcast_to(t_prim, (nrho, t_prim.size)),
        rho[:, None] + t_comp[None, :],
        (rho / 2)[:, None],
    ], axis=1)
    x = np.sort(x, axis=1)
    b1 = np.interp(np.abs(x), r, prof)
    b2 = np.interp(np.abs(x - rho[:, None]), r, prof)
    f = np.asarray(flux)[:, None, None]
    prof2 = b1[None] + f * b2[None]                          # (nf, nrho, nx)
    # local maxima (interior samples higher than the left neighbour, not lower than the right)
    peak = np.zeros(prof2.shape, dtype=bool)
    peak[..., 1:-1] = (prof2[..., 1:-1] > prof2[..., :-2]) & (prof2[..., 1:-1] >= prof2[..., 2:])
    tol = 1e-9 * s
    half = (rho / 2)[:, None]
    # primary's maximum: the local maximum nearest to 0 on its side of the midpoint;
    # companion's: the local maximum nearest to rho on its side (up to rho + 0.5 s)
    prim_ok = peak & (x < half - tol)[None]
    comp_ok = peak & ((x > half + tol) & (x <= rho[:, None] + 0.5 * s + tol))[None]
    xb = np.broadcast_to(x, prof2.shape)
    i1 = np.argmin(np.where(prim_ok, np.abs(xb), np.inf), axis=2)
    i2 = np.argmin(np.where(comp_ok, np.abs(xb - rho[None, :, None]), np.inf), axis=2)
    found = prim_ok.any(axis=2) & comp_ok.any(axis=2)
    idx = np.arange(x.shape[1])[None, None, :]
    between = (idx >= i1[..., None]) & (idx <= i2[..., None])
    lo = np.min(np.where(between, prof2, np.inf), axis=2)
    p1 = np.take_along_axis(prof2, i1[..., None], axis=2)[..., 0]
    p2 = np.take_along_axis(prof2, i2[..., None], axis=2)[..., 0]
    separate = found & (lo < np.minimum(p1, p2))
    dip = np.where(separate, 1.0 - lo / np.minimum(p1, p2), np.nan)
    # contrast against the primary's outer envelope
    env = np.maximum.accumulate(prof[::-1])[::-1]
    benv = np.interp(rho, r, env)
    ratio = np.asarray(flux)[:, None] / np.maximum(benv[None, :], 1e-300)
    return rho, dip, ratio


def _required(rho, dip, ratio, delta, contrast):
    """Smallest separation beyond which every grid separation is split."""
    ok = (np.nan_to_num(dip, nan=-1.0) >= delta) & (ratio >= contrast)
    nf, nrho = ok.shape
    fail = ~ok
    # index of the last failing separation (-1 when none fails)
    last = np.where(fail.any(axis=1), nrho - 1 - np.argmax(fail[:, ::-1], axis=1), -1)
    out = np.empty(nf)
    for i in range(nf):  # nf ~ 30: per-cell bookkeeping, not a hot path
        j = last[i]
        if j < 0:
            out[i] = rho[0]
        elif j >= nrho - 1:
            out[i] = rho[-1]
        else:
            # interpolate the failing margin between the last failure and the next success
            m = []
            for arr, thr in ((dip[i], delta), (np.log(ratio[i]), np.log(contrast))):
                a, b = arr[j] - thr, arr[j + 1] - thr
                if np.isfinite(a) and np.isfinite(b) and a < 0 <= b and b > a:
                    m.append(a / (a - b))
            frac = max(m) if m else 0.5
            out[i] = rho[j] * (rho[j + 1] / rho[j]) ** frac
    return out


def build_table(dm_axis=DM_AXIS, eps_axis=EPS_AXIS, seeing_axis=SEEING_AXIS,
                criteria=CRITERIA, contrast=DEFAULT_CONTRAST, monotone=True) -> dict:
    """Compute the separability table (lambda/D) over (criterion, dm, eps, seeing).

    Returns a dict of arrays ready for ``numpy.savez``.  ``raw`` holds the
    searched values, ``table`` the same after the monotone cumulative maxima.
    """
    t0 = time.perf_counter()
    dm_axis = np.asarray(dm_axis, float)
    eps_axis = np.asarray(eps_axis, float)
    seeing_axis = np.asarray(seeing_axis, float)
    flux = 10.0 ** (-0.4 * dm_axis)
    deltas = np.array([dip_threshold(c) for c in criteria])
    raw = np.empty((len(criteria), dm_axis.size, eps_axis.size, seeing_axis.size))
    for k, w in enumerate(seeing_axis):
        s = max(1.0, w)
        r = np.arange(0.0, _R_MAX * s + 1e-9, _R_STEP * s)
        cache = _kernel(r, w)
        for j, eps in enumerate(eps_axis):
            prof = star_profile(r, eps, w, _kernel_cache=cache)
            rho, dip, ratio = _cell_margins(r, prof, s, flux)
            for c, delta in enumerate(deltas):
                raw[c, :, j, k] = _required(rho, dip, ratio, delta, contrast)
    table = raw.copy()
    if monotone:
        table = np.maximum.accumulate(table, axis=1)
        table = np.maximum.accumulate(table, axis=3)
    return {
        "version": np.array(TABLE_VERSION),
        "criteria": np.array(criteria),
        "dm_axis": dm_axis, "eps_axis": eps_axis, "seeing_axis": seeing_axis,
        "deltas": deltas, "contrast": np.array(float(contrast)),
        "raw": raw.astype(np.float32), "table": table.astype(np.float32),
        "build_seconds": np.array(time.perf_counter() - t0),
    }


# --------------------------------------------------------------------------
# loading and interpolation
# --------------------------------------------------------------------------

_TABLES: dict = {}


def shipped_table_path() -> Path:
    return Path(__file__).with_name(TABLE_FILE)


def write_shipped_table() -> dict:
    """Rebuild the table with the default parameters and write it beside this module
    (``python -m planner.optics.separability``)."""
    import io

    from planner.config.storage import atomic_write_bytes

    data = build_table()
    buf = io.BytesIO()
    np.savez_compressed(buf, **data)
    atomic_write_bytes(shipped_table_path(), buf.getvalue())
    shipped_table_path().chmod(0o644)
    return data


def load_table(contrast: float = DEFAULT_CONTRAST) -> dict:
    """The table for ``contrast``: the shipped file for the default, otherwise
    built once into the user cache (``user_dir('cache')``)."""
    key = round(float(contrast), 6)
    if key in _TABLES:
        return _TABLES[key]
    paths = []
    if key == DEFAULT_CONTRAST:
        paths.append(shipped_table_path())
    from planner.config.storage import user_dir
    from planner.errors import PlannerError

    try:
        cache = user_dir("cache") / f"separability_v{TABLE_VERSION}_c{key:g}.npz"
        paths.append(cache)
    except PlannerError:  # no cache folder (cannot be created): build in memory when needed
        cache = None
    data = None
    for p in paths:
        if p.exists():
            try:
                with np.load(p, allow_pickle=False) as z:
                    data = {k: z[k] for k in z.files}
                if int(data["version"]) != TABLE_VERSION:
                    data = None
                    continue
                break
            except (OSError, ValueError, KeyError):
                if p == cache:
                    from planner.config.storage import quarantine

                    quarantine(p)
                data = None
    if data is None:
        import io

        from planner.config.storage import atomic_write_bytes

        data = build_table(contrast=key)
        buf = io.BytesIO()
        np.savez_compressed(buf, **data)
        if cache is not None:
            try:
                atomic_write_bytes(cache, buf.getvalue())
            except PlannerError:  # a cache that cannot be written only costs speed
                pass
    data["_interp"] = {}
    for c, name in enumerate(data["criteria"]):
        tab = data["table"][c].astype(float)
        norm = tab / tab[0, 0, 0]
        data["_interp"][str(name)] = _Trilinear(
            (data["dm_axis"], data["eps_axis"], data["seeing_axis"]), norm)
    _TABLES[key] = data
    return data


class _Trilinear:
    """Linear interpolation on a regular 3-D grid, numpy only (the same result as
    scipy's ``RegularGridInterpolator(method="linear")``; scipy.interpolate
    takes longer to import than a whole one-pair check).  Points outside the
    grid or with NaN coordinates give NaN."""

    def __init__(self, axes, values):
        self.axes = [np.asarray(a, dtype=float) for a in axes]
        self.values = np.asarray(values, dtype=float)

    def __call__(self, pts):
        pts = np.asarray(pts, dtype=float)
        idx, frac, bad = [], [], np.zeros(len(pts), bool)
        for d, a in enumerate(self.axes):
            x = pts[:, d]
            bad |= ~np.isfinite(x) | (x < a[0]) | (x > a[-1])
            i = np.clip(np.searchsorted(a, x, side="right") - 1, 0, len(a) - 2)
            idx.append(i)
            frac.append(np.clip((x - a[i]) / (a[i + 1] - a[i]), 0.0, 1.0))
        out = np.zeros(len(pts))
        for corner in range(8):
            w = np.ones(len(pts))
            ii = []
            for d in range(3):
                up = (corner >> d) & 1
                w = w * (frac[d] if up else 1.0 - frac[d])
                ii.append(idx[d] + up)
            out += w * self.values[ii[0], ii[1], ii[2]]
        out[bad] = np.nan
        return out


def relative_separation(delta_mag, obstruction, seeing_lod, criterion="dawes",
                        contrast: float = DEFAULT_CONTRAST):
    """Required separation in units of the classical equal-pair limit (1 at dm = 0,
    eps = 0, no seeing), by vectorised interpolation in the table."""
    key = check_criterion(criterion)
    tab = load_table(contrast)
    dm = np.clip(np.abs(np.asarray(delta_mag, dtype=float)), 0.0, tab["dm_axis"][-1])
    eps = np.clip(np.asarray(obstruction, dtype=float), 0.0, tab["eps_axis"][-1])
    w = np.asarray(seeing_lod, dtype=float)
    wmax = tab["seeing_axis"][-1]
    dm, eps, w = np.broadcast_arrays(dm, eps, w)
    wc = np.clip(w, 0.0, wmax)
    pts = np.stack([dm.ravel(), eps.ravel(), wc.ravel()], axis=-1)
    val = tab["_interp"][key](pts).reshape(dm.shape)
    val = np.where(w > wmax, val * w / wmax, val)
    return val


def effective_blur_lod(aperture_mm, seeing_arcsec=0.0, airmass=1.0, wavelength_nm=550.0,
                       steady_fraction=DEFAULT_STEADY_FRACTION, dispersion_arcsec=0.0):
    """Blur FWHM used by the model, in lambda/D: k x seeing at the airmass and
    wavelength, with any dispersion added in quadrature."""
    see = steady_fraction * seeing_fwhm_arcsec(seeing_arcsec, airmass, wavelength_nm)
    blur = np.hypot(see, np.nan_to_num(np.asarray(dispersion_arcsec, dtype=float)))
    return blur / lod_arcsec(aperture_mm, wavelength_nm)


def physical_separation_arcsec(aperture_mm, delta_mag, obstruction=0.0, seeing_arcsec=0.0,
                               airmass=1.0, wavelength_nm=550.0, criterion="dawes", *,
                               steady_fraction=DEFAULT_STEADY_FRACTION, contrast=DEFAULT_CONTRAST,
                               dispersion_arcsec=0.0):
    """Required separation [arcsec] from the physical model (see module docstring)."""
    key = check_criterion(criterion)
    if not 0.0 < float(steady_fraction) <= 1.5:
        raise InputError(f"steady_fraction = {steady_fraction!r} is not allowed; use a number in (0, 1.5]")
    if not float(contrast) > 0:
        raise InputError(f"contrast = {contrast!r} is not allowed; use a positive number (default 2)")
    w = effective_blur_lod(aperture_mm, seeing_arcsec, airmass, wavelength_nm, steady_fraction,
                           dispersion_arcsec)
    rel = relative_separation(delta_mag, obstruction, w, key, contrast)
    sep = rel * LIMIT_MODELS[key](aperture_mm, wavelength_nm)
    floor = unequal_floor_lod(delta_mag, obstruction) * lod_arcsec(aperture_mm, wavelength_nm)
    return np.maximum(sep, floor)


#: Floor for unequal pairs in perfect air, lambda/D: the separation at which the summed
#: profile first shows a distinct secondary maximum ("generalised Sparrow"), computed in
#: docs/methods.md section 2 [D] for a clear aperture and for eps = 0.33, and recommended
#: there as a hard floor.  Rows: dm; columns: eps = 0, 0.33 (dm 2.5 for eps = 0.33 is the
#: mean of its neighbours; dm 2.5-3 for eps = 0 is the quoted "1.41-1.46").
_FLOOR_DM = np.array([0.0, 0.5, 1.0, 2.0, 2.5, 3.0])
_FLOOR_EPS = np.array([0.0, 0.33])
_FLOOR_LOD = np.array([[0.947, 0.909],
                       [1.11, 1.05],
                       [1.18, 1.09],
                       [1.22, 1.40],
                       [1.41, 1.435],
                       [1.46, 1.47]])


def unequal_floor_lod(delta_mag, obstruction=0.0):
    """Smallest separation (lambda/D) at which a pair of magnitude difference ``delta_mag``
    shows as two stars at all, whatever the criterion, seeing or steadiness: the
    generalised-Sparrow values of docs/methods.md section 2, interpolated linearly in dm
    and in eps (held beyond dm = 3, where the rings and the contrast rule take over, and
    beyond eps = 0.33).  Never below the physical model's own table, only above it where the
    table's dip-and-contrast rule would let a faint companion show inside the first dark
    ring."""
    dm = np.clip(np.abs(np.asarray(delta_mag, dtype=float)), 0.0, _FLOOR_DM[-1])
    eps = np.clip(np.asarray(obstruction, dtype=float), 0.0, _FLOOR_EPS[-1])
    a = np.interp(dm, _FLOOR_DM, _FLOOR_LOD[:, 0])
    b = np.interp(dm, _FLOOR_DM, _FLOOR_LOD[:, 1])
    t = eps / _FLOOR_EPS[-1]
    return a + (b - a) * t


if __name__ == "__main__":  # pragma: no cover
    d = write_shipped_table()
    print(f"wrote {shipped_table_path()} in {float(d['build_seconds']):.1f} s")


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
