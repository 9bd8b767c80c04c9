"""The Python API in a few lines: tonight's plan, one pair, an aperture comparison.

Run from the repository root:  python examples/api_tonight.py
Uses the invented demo club's field (see README.md here) and the bundled sample.
"""

from planner.api import check_pair, compare_apertures, orbit_positions, plan_night, read_orb6, write_report

FIELD = {"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"}
EVENING = "2026-12-05"

# 1. Tonight's plan for a 102 mm refractor in 1.5" seeing, the 12 best pairs spread over the night
plan = plan_night(FIELD, [{"name": "Loan 102", "aperture_mm": 102.0}], EVENING, seeing_arcsec=1.5, limit=12)
print(plan.schedule[["slot_local", "discoverer", "components", "rho_arcsec", "alt_deg", "margin"]]
      .to_string(index=False))
write_report(plan, "api-plan.html")

# 2. One pair: can an 80 mm split Castor this evening, and when is its season?
castor = check_pair("sample", "STF 1110 AB", FIELD, EVENING, {"aperture_mm": 80.0}, seeing_arcsec=2.0)
print(f"\nCastor: rho {castor['rho_arcsec']:.2f}\", verdict {castor['verdict']} ({castor['reason']}); "
      f"best at {castor['best_local']}; season {castor['best_dates']['good_from']} to "
      f"{castor['best_dates']['good_to']}")

# 3. How many pairs does each aperture split tonight?
res = compare_apertures(FIELD, [60, 102, 152, 203], EVENING, seeing_arcsec=1.5)
print("\n" + res["table"][["aperture_mm", "n_split", "n_added"]].to_string(index=False))

# 4. The layers underneath: an orbit from the bundled ORB6 file at three epochs
from importlib import resources  # noqa: E402

orbits = read_orb6(resources.files("planner.catalogs_sample") / "orb6_orbits.txt")
eta_crb = orbits[(orbits["wds_id"] == "15232+3017") & orbits["preferred"]]
print("\n" + orbit_positions(eta_crb.iloc[[0, 0, 0]], [2026.0, 2030.0, 2035.0])[["epoch_yr", "rho_arcsec", "theta_deg"]]
      .to_string(index=False))
