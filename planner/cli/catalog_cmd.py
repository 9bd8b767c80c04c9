"""``splitplan catalog``: what is loaded, download from VizieR, bring in a local file."""

from __future__ import annotations

import json
import sys

from planner.cli.parser import Command, Group


def _problem_summary(problems: list, limit: int = 10) -> list[str]:
    """Skipped lines grouped by file and reason, with the first line numbers."""
    groups: dict[tuple, list[int]] = {}
    for file, line_no, reason in problems:
        groups.setdefault((str(file), reason), []).append(int(line_no))
    out = []
    for (file, reason), nums in list(groups.items())[:limit]:
        shown = ", ".join(str(n) for n in nums[:8]) + (", ..." if len(nums) > 8 else "")
        out.append(f"{file}: {len(nums)} line(s) skipped, {reason} (line {shown})")
    return out


def show_arguments(p) -> None:
    p.add_argument("--catalog", "-c", default="sample", metavar="SOURCE",
                   help="'sample' (bundled, the default), 'vizier' (your downloaded copy) or the "
                        "path of a WDS summary or ORB6 orbits text file.")
    p.add_argument("--orbits", metavar="FILE", help="An ORB6 orbits file to go with a WDS file.")
    p.add_argument("--json", dest="as_json", action="store_true", help="Print the summary as JSON.")


def show(a) -> None:
    """Say which catalogue is loaded, when it was copied, and what it holds."""
    catalog, orbits, as_json = a.catalog, a.orbits, a.as_json
    from planner.api import load_catalog

    cat = load_catalog(catalog, orbits=orbits)
    info = cat.summary()
    info["problem_lines"] = _problem_summary(cat.problems)
    if as_json:
        sys.stdout.write(json.dumps(info, indent=1) + "\n")
        return
    grades = ", ".join(f"grade {g}: {n}" for g, n in info["orbits_by_grade"].items()) or "none"
    print(f"source:    {info['source']}")
    print(f"copied:    {info['retrieved']}")
    print(f"pairs:     {info['pairs']}")
    print(f"pairs with a usable orbit (complete, grade 1-5): {info['pairs_with_usable_orbit']}")
    print(f"orbits:    {info['orbits']} ({info['orbits_complete']} with complete elements)")
    print(f"by grade:  {grades}")
    print(f"skipped lines: {info['problems']}")
    for line in info["problem_lines"]:
        print(f"  {line}")


def fetch(a) -> None:
    """Download the full WDS and ORB6 from CDS VizieR and keep them as your local copy.

    The previous copy is kept if the download fails or is incomplete."""
    from planner.api import fetch_vizier, vizier_folder, vizier_snapshot

    cat = fetch_vizier()
    meta = vizier_snapshot() or {}
    print(f"stored {len(cat.pairs)} pairs and {len(cat.orbits)} orbits from {cat.source} "
          f"({cat.retrieved}) in {vizier_folder()}")
    missing = {k: v for k, v in (meta.get("missing_fields") or {}).items() if v}
    for k, v in missing.items():
        print(f"note: VizieR {k.upper()} table has no column for: {', '.join(v)}", file=sys.stderr)


def resolve_arguments(p) -> None:
    p.add_argument("name", help="A star name, catalogue number, WDS id or designation (docs/names.md).")
    p.add_argument("--catalog", "-c", default="sample", metavar="SOURCE",
                   help="'sample' (bundled, the default), 'vizier' (your downloaded copy) or a file path.")
    p.add_argument("--online", action="store_true",
                   help="If the offline name index has no answer, ask the CDS SIMBAD name resolver "
                        "(needs the network; answers are cached).")
    p.add_argument("--json", dest="as_json", action="store_true", help="Print the answer as JSON.")


def resolve(a) -> None:
    """What a name is, and which pairs of the loaded catalogue it names."""
    from planner.api import describe_name, load_catalog
    from planner.errors import UnknownPairError

    cat = load_catalog(a.catalog)
    d = describe_name(cat, a.name, online=a.online)
    p = cat.pairs
    rows = [{"wds_id": str(p.at[lab, "wds_id"]), "designation": f"{p.at[lab, 'discoverer']} "
             f"{p.at[lab, 'components']}".strip(), "source": str(p.at[lab, "source"])} for lab in d["pairs"]]
    if a.as_json:
        sys.stdout.write(json.dumps(dict(d, pairs=rows), indent=1, ensure_ascii=False, default=str) + "\n")
        return
    for s in d["stars"]:
        ids = ", ".join(x for x in (f"HD {s['hd']}" if s["hd"] else "", f"HIP {s['hip']}" if s["hip"] else "",
                                    f"SAO {s['sao']}" if s["sao"] else "",
                                    f"ADS {s['ads']} {s['ads_components']}".strip() if s["ads"] else "",
                                    s["dm"]) if x)
        wds = f"; WDS {s['wds_id']} ({s['wds_id_from']})" if s["wds_id"] else ""
        print(f"{s['label']}" + (f" ({ids})" if ids else "") + wds)
    if d.get("online"):
        o = d["online"]
        print(f"{d['source']}: {o.get('main_id') or a.name}"
              + (f", RA {o['ra_deg']:.5f} Dec {o['dec_deg']:+.5f}" if o.get("ra_deg") is not None else ""))
    if rows:
        print(f"pairs in {cat.source} (closest to splittable first):")
        for r in rows:
            print(f"  {r['wds_id']}  {r['designation']}  [{r['source']}]")
    else:
        raise UnknownPairError(a.name, d.get("suggestions") or [], message=d.get("message"))


def import_arguments(p) -> None:
    p.add_argument("path", help="A WDS summary or ORB6 orbits text file.")
    p.add_argument("--orbits", metavar="FILE", help="An ORB6 orbits file to store with a WDS file.")


def import_(a) -> None:
    """Check a local catalogue file and, if it reads, store a copy as your local catalogue."""
    path, orbits = a.path, a.orbits
    from planner.api import import_catalog_files

    meta = import_catalog_files(path, orbits=orbits)
    rows = meta["rows"]
    print(f"stored {meta['source']}: {rows['pairs']} pairs, {rows['orbits']} orbits "
          f"(use --catalog vizier)")


GROUP = Group("catalog", summary="The catalogues: what is loaded, download from CDS VizieR, import a file.",
              help="The double-star and orbit catalogues the planner works from: look at them, "
                              "download the full ones from CDS VizieR, or bring in your own copy.", children=[
    Command("show", arguments=show_arguments, run=show,
            help="Say which catalogue is loaded, when it was copied, and what it holds."),
    Command("fetch", arguments=lambda p: None, run=fetch,
            help="Download the full WDS and ORB6 from CDS VizieR and keep them as your local copy. "
                 "The previous copy is kept if the download fails or is incomplete."),
    Command("resolve", arguments=resolve_arguments, run=resolve, usage="name",
            help="Say what a star name or catalogue number is and which pairs of the loaded "
                 "catalogue it names (offline; --online asks CDS SIMBAD when the name index has no answer)."),
    Command("import", arguments=import_arguments, run=import_, usage="path",
            help="Check a local catalogue file and, if it reads, store a copy as your local catalogue "
                 "(used with --catalog vizier)."),
])
