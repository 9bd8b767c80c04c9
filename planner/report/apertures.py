"""The aperture comparison (``splitplan apertures``) as text, JSON and CSV.

``res`` is what :func:`planner.plan.apertures.compare_apertures` returns: the dates
sampled, the seeing and obstruction, and a table with one row per aperture
(``aperture_mm``, ``n_split``, ``n_added``, ``added``: the names of the pairs that
aperture adds).
"""

from __future__ import annotations

import json

from planner.report.safe import csv_cell, terminal_text


def aperture_doc(res) -> dict:
    """The JSON document of the comparison."""
    t = res["table"]
    return {"dates": res["dates"], "seeing_arcsec": res["seeing_arcsec"], "obstruction": res["obstruction"],
            "apertures": [{"aperture_mm": float(r.aperture_mm), "n_split": int(r.n_split),
                           "n_added": int(r.n_added), "added": list(r.added)} for r in t.itertuples()]}


def aperture_json(res) -> str:
    return json.dumps(aperture_doc(res), indent=1, ensure_ascii=False) + "\n"


def aperture_csv(res) -> str:
    """One row per aperture; the added pairs joined by '; '."""
    t = res["table"]
    return t.assign(added=[csv_cell("; ".join(a)) for a in t["added"]]).to_csv(index=False)


def aperture_text(res) -> str:
    """The terminal table: pairs split per aperture and the first few each step adds."""
    d = res["dates"]
    span = d[0] if len(d) == 1 else f"{d[0]} .. {d[-1]} ({len(d)} nights sampled)"
    lines = [f"Pairs split, {span}; seeing {res['seeing_origin']}; obstruction {res['obstruction']:.2f}"]
    lines += [terminal_text(f"{name}: {cal.header()}") for name, cal in res.get("calibrations", ())]
    lines.append(f"{'aperture':>9} {'pairs':>6} {'added':>6}  first few added")
    for r in res["table"].itertuples():
        few = terminal_text(", ".join(r.added[:6]) + (" ..." if len(r.added) > 6 else ""))
        lines.append(f"{r.aperture_mm:>6g} mm {r.n_split:>6} {r.n_added:>+6}  {few}")
    return "\n".join(lines) + "\n"


#: the formats of the aperture table by name
APERTURE_FORMATS = {"csv": aperture_csv, "json": aperture_json}
