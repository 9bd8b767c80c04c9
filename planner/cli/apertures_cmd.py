"""``splitplan apertures``: how many pairs each aperture splits, and what each step adds."""

from __future__ import annotations

import sys

from planner.cli import options as opt
from planner.cli.parser import Command


#: what ``--out -`` can write
STREAM_FORMATS = ("csv", "json")


def arguments(p) -> None:
    p.add_argument("sizes", nargs="+", type=float,
                   help="Apertures in mm, e.g. 60 80 102 127 152 203 254 305.")
    g = p  # the general options
    g.add_argument("--date", "--from", dest="date", metavar="YYYY-MM-DD",
                   help="Local date (start of a range with --to).")
    g.add_argument("--to", dest="date_to", metavar="YYYY-MM-DD",
                   help="Last date of a range (a few nights are sampled).")
    g.add_argument("--nights", type=int, default=4, metavar="N",
                   help="Nights sampled across --from/--to (default 4).")
    g.add_argument("--obstruction", type=float, default=0.0, metavar="RATIO",
                   help="Central obstruction ratio for every aperture (default 0).")
    opt.air(g)
    opt.add(g, "calibration")
    opt.catalog(g)
    g.add_argument("--minutes", type=float, metavar="MIN",
                   help="A pair must be up this long in the dark (default 10).")
    g.add_argument("--plot", type=opt.path, metavar="FILE", help="Plot count versus aperture (.png, .svg, .pdf).")
    g.add_argument("--json", dest="as_json", action="store_true", help="Print the table as JSON.")
    g.add_argument("--out", type=opt.path, metavar="FILE",
                   help="Write the table (.csv or .json), or - for standard output (with --format).")
    opt.stream_format(g, STREAM_FORMATS)
    opt.site(p.add_argument_group("Site"))
    f = p.add_argument_group("Filters")
    f.add_argument("--mag-max", type=float, metavar="MAG", help="Primary no fainter than this.")
    f.add_argument("--dm-max", type=float, metavar="MAG", help="Largest magnitude difference.")
    f.add_argument("--orbits-only", action="store_true", help="Only pairs with an orbit.")


def run(a) -> None:
    """How many pairs each aperture can split tonight (or over a range of nights)."""
    sizes, date, date_to, nights, obstruction = a.sizes, a.date, a.date_to, a.nights, a.obstruction
    site, lat, lon, elevation, tz, min_alt = (a.site, a.lat, a.lon, a.elevation, a.tz, a.min_alt)
    seeing, steadiness, darkness, catalog, minutes = a.seeing, a.steadiness, a.darkness, a.catalog, a.minutes
    mag_max, dm_max, orbits_only, plot, as_json, out = (a.mag_max, a.dm_max, a.orbits_only, a.plot,
                                                         a.as_json, a.out)
    from planner.api import compare_request, plot_aperture_counts
    from planner.cli.night_cmd import build_request
    from planner.errors import InputError
    from planner.report.apertures import APERTURE_FORMATS, aperture_json, aperture_text

    opt.check_darkness(darkness)
    opt.check_stream(out, a.out_format, as_json, STREAM_FORMATS)
    out_fmt = a.out_format if opt.to_stdout(out) else (out.suffix.lower().lstrip(".") if out else None)
    if out is not None and out_fmt not in APERTURE_FORMATS:
        raise InputError(f"--out {out}: use .csv or .json for the aperture table")
    req = build_request(site=site, lat=lat, lon=lon, elevation=elevation, tz=tz, min_alt=min_alt, date=date,
                        aperture=[float(sizes[0])], obstruction=[obstruction], seeing=seeing,
                        steadiness=steadiness, darkness=darkness, catalog=catalog, minutes=minutes,
                        mag_max=mag_max, dm_max=dm_max, orbits_only=orbits_only, calibration=a.calibration)
    res = compare_request(req, sizes, date_to=date_to, nights=nights)
    if opt.to_stdout(out):
        sys.stdout.write(APERTURE_FORMATS[out_fmt](res))
    else:
        sys.stdout.write(aperture_json(res) if as_json else aperture_text(res))
        if out is not None:
            from planner.config.storage import atomic_write_text

            atomic_write_text(out, APERTURE_FORMATS[out_fmt](res))
            print(f"splitplan: wrote {out}", file=sys.stderr)
    if plot is not None:
        if plot.suffix.lower() not in (".png", ".svg", ".pdf"):
            raise InputError(f"--plot {plot}: use .png, .svg or .pdf")
        plot_aperture_counts(res, plot)
        print(f"splitplan: wrote {plot}", file=sys.stderr)


COMMAND = Command("apertures", arguments=arguments, run=run, usage="sizes [sizes ...]", no_args_is_help=True,
                  help="How many pairs each aperture can split tonight (or over a range of nights).")
