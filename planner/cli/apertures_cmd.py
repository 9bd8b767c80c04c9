"""``splitplan apertures``: how many pairs each aperture splits, and what each step adds."""

from __future__ import annotations

import json
import sys
from pathlib import Path
from typing import List, Optional

import typer

from planner.cli import app
from planner.cli import options as opt


@app.command("apertures", no_args_is_help=True)
def apertures(
    sizes: List[float] = typer.Argument(..., help="Apertures in mm, e.g. 60 80 102 127 152 203 254 305."),
    site: Optional[str] = opt.site("Site"),
    lat: Optional[float] = opt.lat("Site"),
    lon: Optional[float] = opt.lon("Site"),
    elevation: Optional[float] = opt.elevation("Site"),
    tz: Optional[str] = opt.tz("Site"),
    min_alt: Optional[float] = opt.min_alt("Site"),
    date: Optional[str] = typer.Option(None, "--date", "--from", help="Local date YYYY-MM-DD (start of a range with --to)."),
    date_to: Optional[str] = typer.Option(None, "--to", help="Last date of a range (a few nights are sampled)."),
    nights: int = typer.Option(4, "--nights", help="Nights sampled across --from/--to."),
    obstruction: float = typer.Option(0.0, "--obstruction", help="Central obstruction ratio for every aperture."),
    seeing: Optional[float] = opt.seeing(),
    steadiness: Optional[float] = opt.steadiness(),
    darkness: Optional[str] = opt.darkness(),
    catalog: Optional[str] = opt.catalog(),
    minutes: Optional[float] = typer.Option(None, "--minutes", help="A pair must be up this long in the dark (default 10)."),
    mag_max: Optional[float] = typer.Option(None, "--mag-max", help="Primary no fainter than this.", rich_help_panel="Filters"),
    dm_max: Optional[float] = typer.Option(None, "--dm-max", help="Largest magnitude difference.", rich_help_panel="Filters"),
    orbits_only: bool = typer.Option(False, "--orbits-only", help="Only pairs with an orbit.", rich_help_panel="Filters"),
    plot: Optional[Path] = typer.Option(None, "--plot", help="Plot count versus aperture (.png, .svg, .pdf)."),
    as_json: bool = typer.Option(False, "--json", help="Print the table as JSON."),
    out: Optional[Path] = typer.Option(None, "--out", help="Write the table (.csv or .json)."),
):
    """How many pairs each aperture can split tonight (or over a range of nights)."""
    from planner.cli.night_cmd import build_request
    from planner.errors import InputError
    from planner.plan.apertures import compare_apertures, plot_counts
    from planner.report.safe import terminal_text

    opt.check_darkness(darkness)
    req = build_request(site=site, lat=lat, lon=lon, elevation=elevation, tz=tz, min_alt=min_alt, date=date,
                        aperture=[float(sizes[0])], obstruction=[obstruction], seeing=seeing,
                        steadiness=steadiness, darkness=darkness, catalog=catalog, minutes=minutes,
                        mag_max=mag_max, dm_max=dm_max, orbits_only=orbits_only)
    res = compare_apertures(req, sizes, date_to=date_to, nights=nights)
    t = res["table"]
    doc = {"dates": res["dates"], "seeing_arcsec": res["seeing_arcsec"], "obstruction": res["obstruction"],
           "apertures": [{"aperture_mm": float(r.aperture_mm), "n_split": int(r.n_split),
                          "n_added": int(r.n_added), "added": list(r.added)} for r in t.itertuples()]}
    if as_json:
        sys.stdout.write(json.dumps(doc, indent=1, ensure_ascii=False) + "\n")
    else:
        d = res["dates"]
        span = d[0] if len(d) == 1 else f"{d[0]} .. {d[-1]} ({len(d)} nights sampled)"
        print(f"Pairs split, {span}; seeing {res['seeing_origin']}; obstruction {res['obstruction']:.2f}")
        print(f"{'aperture':>9} {'pairs':>6} {'added':>6}  first few added")
        for r in t.itertuples():
            few = terminal_text(", ".join(r.added[:6]) + (" ..." if len(r.added) > 6 else ""))
            print(f"{r.aperture_mm:>6g} mm {r.n_split:>6} {r.n_added:>+6}  {few}")
    if out is not None:
        from planner.config.storage import atomic_write_text
        from planner.report.safe import csv_cell

        ext = out.suffix.lower()
        if ext == ".json":
            atomic_write_text(out, json.dumps(doc, indent=1, ensure_ascii=False) + "\n")
        elif ext == ".csv":
            rows = t.assign(added=[csv_cell("; ".join(a)) for a in t["added"]])
            atomic_write_text(out, rows.to_csv(index=False))
        else:
            raise InputError(f"--out {out}: use .csv or .json for the aperture table")
        print(f"splitplan: wrote {out}", file=sys.stderr)
    if plot is not None:
        if plot.suffix.lower() not in (".png", ".svg", ".pdf"):
            raise InputError(f"--plot {plot}: use .png, .svg or .pdf")
        plot_counts(res, plot)
        print(f"splitplan: wrote {plot}", file=sys.stderr)
