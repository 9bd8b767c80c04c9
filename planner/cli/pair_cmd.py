"""``splitplan pair QUERY``: where the companion is today (or at any date).

Parses the options, asks the public API for the pair's
:class:`~planner.plan.pair_report.PairReport` (:func:`planner.api.pair_report`) and
prints it (:mod:`planner.report.pair`): the separation rho and position angle theta at
a date, how they were obtained, the orbit grade and how far to trust the figures;
optionally a table over a range of years, a plot of the apparent orbit, JSON, and with
a site and a telescope the verdict for the evening.
"""

from __future__ import annotations

import sys

from planner.cli import options as opt
from planner.cli.parser import Command

TONIGHT = "Verdict tonight (needs a site and a telescope)"


def arguments(p) -> None:
    p.add_argument("query",
                   help="A star name (Albireo, 'eps Lyr', 'ε¹ Lyr', '70 Oph', 'HD 165341', 'BD+27 3410'), "
                        "a WDS id (18055+0230) or a designation (STF2272AB, 'STF 2272 AB', STF2272); "
                        "see docs/names.md.")
    p.add_argument("--online", action="store_true",
                   help="If the offline name index does not know the name, ask the CDS SIMBAD name "
                        "resolver (needs the network; answers are cached).")
    g = p  # the general options
    opt.catalog(g, "sample")
    g.add_argument("--date", metavar="YYYY-MM-DD",
                   help="Date (the evening, for the verdict); default now.")
    g.add_argument("--epoch", type=float, metavar="YEAR", help="Epoch as a year, e.g. 2031.5 (Besselian).")
    g.add_argument("--years", metavar="FROM:TO[:STEP]", help="Table over a range of years, e.g. 2020:2040:2.")
    g.add_argument("--plot", type=opt.path, metavar="FILE", help="Draw the apparent orbit to FILE.png or FILE.svg.")
    opt.force(g)
    g.add_argument("--json", dest="as_json", action="store_true", help="Machine-readable output.")
    g.add_argument("--precession", default="j2000", metavar="FRAME",
                   help="Precession of theta: j2000 (default), equinox or none.")
    t = p.add_argument_group(TONIGHT)
    opt.site(t)
    opt.telescope(t, many=False)
    opt.air(t)
    opt.add(t, "calibration")


def verdict_request(a):
    """The night request for the verdict (site, one telescope, seeing, the evening of
    --date), built exactly as ``splitplan night`` builds it; None without a site or a
    telescope."""
    from planner.cli.night_cmd import build_request
    from planner.errors import InputError

    if not any(v for v in (a.site, a.lat, a.lon, a.scope, a.aperture)):
        if any(v is not None for v in (a.seeing, a.steadiness, a.darkness, a.obstruction, a.elevation,
                                       a.tz, a.min_alt, a.calibration)):
            raise InputError("a verdict needs a site (--site or --lat/--lon/--tz) and a telescope "
                             "(--aperture or --scope)")
        return None
    if a.epoch is not None:
        raise InputError("the verdict is for an evening: give --date YYYY-MM-DD, not --epoch")
    opt.check_darkness(a.darkness)
    if a.scope and len(a.scope) > 1 or a.aperture and len(a.aperture) > 1:
        raise InputError("splitplan pair judges one telescope; use 'splitplan night' for several")
    return build_request(**opt.site_values(a), **opt.scope_values(a), **opt.air_values(a), date=a.date,
                         calibration=a.calibration)


def run(a) -> None:
    """Separation and position angle of one pair, and the verdict when a site and a
    telescope are given."""
    import json

    from planner.api import find_pairs, find_pairs_online, load_catalog, pair_report, parse_years, resolve_epoch
    from planner.report.pair import plot_pair, render_text
    from planner.report.safe import terminal_text

    from planner.cli.night_cmd import skipped_lines_note
    from planner.errors import InputError

    epoch_yr = resolve_epoch(a.date, a.epoch)
    years = parse_years(a.years) if a.years else None
    plot = a.plot
    if plot is not None:
        if plot.suffix.lower() not in (".png", ".svg"):
            raise InputError(f"--plot {plot}: the file name must end in .png or .svg")
        (plot,) = opt.check_outputs(a.force, plot=plot)
    catalog = load_catalog(a.catalog or "sample")
    skipped_lines_note(len(catalog.problems), a.catalog)
    labels = (find_pairs_online if a.online else find_pairs)(catalog, a.query)
    report = pair_report(labels[0], catalog, epoch_yr, precession=a.precession, years=years,
                         request=verdict_request(a), others=labels[1:])
    if plot is not None:
        written = plot_pair(report, plot, force=a.force)
        print(f"splitplan: wrote {written}", file=sys.stderr)
    if a.as_json:
        sys.stdout.write(json.dumps(report.to_dict(), indent=2) + "\n")
    else:
        sys.stdout.write(terminal_text(render_text(report)))


COMMAND = Command(
    "pair", arguments=arguments, run=run, usage="query", no_args_is_help=True,
    summary="Where the companion is today: separation, position angle, method, uncertainty.",
    help="Separation and position angle of one pair today (or at --date/--epoch), with method and "
         "uncertainty; with a site and a telescope, also the verdict for tonight, the best time and "
         "the best dates of the year.")
