"""Figures for docs/optics.md:  ``python -m planner.optics.figures docs/img``.

Writes ``optics_required.png`` (required separation against dm for a few
seeing values and obstructions), ``optics_rules.png`` (physical model against
the published rules) and ``optics_profile.png`` (profiles of a pair at the
classical limits).
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np


def required_figure(path):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from planner.optics import dawes_limit_arcsec, required_separation_arcsec

    dm = np.linspace(0, 10, 401)
    fig, axes = plt.subplots(1, 2, figsize=(11, 4.4), sharey=True)
    ax = axes[0]
    for seeing, colour in zip((0.0, 1.0, 2.0, 3.0), ("k", "tab:blue", "tab:orange", "tab:red")):
        ax.plot(dm, required_separation_arcsec(200, dm, 0.0, seeing, 1.0), color=colour,
                label=f'seeing {seeing:.0f}"' if seeing else "perfect air")
    ax.axhline(dawes_limit_arcsec(200), color="grey", ls=":", lw=1)
    ax.set_title("200 mm clear aperture, zenith, Dawes calibration")
    ax.set_xlabel("magnitude difference dm")
    ax.set_ylabel("required separation [arcsec]")
    ax.set_yscale("log")
    ax.legend(fontsize=8)
    ax = axes[1]
    for eps, ls in zip((0.0, 0.2, 0.33, 0.5), ("-", "--", "-.", ":")):
        ax.plot(dm, required_separation_arcsec(200, dm, eps, 0.0), color="k", ls=ls, label=f"eps {eps:g}, perfect air")
        ax.plot(dm, required_separation_arcsec(200, dm, eps, 1.5), color="tab:blue", ls=ls,
                label=f'eps {eps:g}, seeing 1.5"')
    ax.set_title("200 mm: effect of the central obstruction")
    ax.set_xlabel("magnitude difference dm")
    ax.legend(fontsize=7, ncol=2)
    for a in axes:
        a.grid(alpha=0.3, which="both")
    fig.tight_layout()
    fig.savefig(path, dpi=110)
    plt.close(fig)


def rules_figure(path):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from planner.optics import required_separation_arcsec
    from planner.optics.rules import peterson_tlm

    dm = np.linspace(0, 7, 281)
    fig, axes = plt.subplots(1, 2, figsize=(11, 4.4), sharey=False)
    for ax, (aperture, seeing) in zip(axes, ((76.2, 1.5), (200.0, 1.5))):
        phys = required_separation_arcsec(aperture, dm, 0.0, seeing)
        ax.plot(dm, phys, "k", lw=2, label="physical model (this project)")
        for m1, colour in ((4.0, "tab:green"), (7.0, "tab:olive")):
            pet = required_separation_arcsec(aperture, dm, 0.0, seeing, model="peterson1954", mag2=m1 + dm)
            pet = np.where(m1 + dm <= peterson_tlm(aperture), pet, np.nan)  # beyond TLM: not seen at all
            ax.plot(dm, pet, color=colour, label=f"Peterson 1954, primary mag {m1:g} (to TLM)")
        for n, ls in ((4.0, "--"), (8.0, "-."), (12.0, ":")):
            lord = required_separation_arcsec(aperture, dm, 0.0, seeing, model="lord1994", lord_n=n)
            ax.plot(dm, lord, color="tab:purple", ls=ls, label=f"Lord 1994, user n = {n:g} (Dawes base)")
        ax.set_yscale("log")
        ax.set_title(f'{aperture:g} mm clear aperture, seeing {seeing:g}" at the zenith')
        ax.set_xlabel("magnitude difference dm")
        ax.set_ylabel("required separation [arcsec]")
        ax.grid(alpha=0.3, which="both")
        ax.legend(fontsize=7)
    fig.tight_layout()
    fig.savefig(path, dpi=110)
    plt.close(fig)


def profile_figure(path):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from planner.optics.limits import RAYLEIGH_LOD, SPARROW_LOD, pair_profile
    from planner.optics.separability import calibration_target_lod

    x = np.linspace(-2.5, 4.5, 1401)
    fig, axes = plt.subplots(1, 2, figsize=(11, 4.0))
    ax = axes[0]
    for name, s in (("Sparrow", SPARROW_LOD), ("Dawes", calibration_target_lod("dawes")), ("Rayleigh", RAYLEIGH_LOD)):
        ax.plot(x, pair_profile(x, s), label=f"{name}, {s:.3f} lambda/D")
    ax.set_title("equal pair, clear aperture, perfect air")
    ax.set_xlabel("position along the pair [lambda/D]")
    ax.set_ylabel("intensity / single-star peak")
    ax.legend(fontsize=8)
    ax = axes[1]
    for dm, s in ((3.0, 1.8), (5.0, 1.8), (5.0, 2.9)):
        ax.semilogy(x, pair_profile(x, s, dm) + 1e-6, label=f"dm {dm:g} at {s:g} lambda/D")
    ax.set_ylim(1e-4, 2)
    ax.set_title("unequal pairs against the rings (clear aperture)")
    ax.set_xlabel("position along the pair [lambda/D]")
    ax.legend(fontsize=8)
    for a in axes:
        a.grid(alpha=0.3)
    fig.tight_layout()
    fig.savefig(path, dpi=110)
    plt.close(fig)


def main(argv=None):
    out = Path((argv or sys.argv[1:] or ["docs/img"])[0])
    out.mkdir(parents=True, exist_ok=True)
    required_figure(out / "optics_required.png")
    rules_figure(out / "optics_rules.png")
    profile_figure(out / "optics_profile.png")
    print(f"wrote figures to {out}")


if __name__ == "__main__":  # pragma: no cover
    main()
