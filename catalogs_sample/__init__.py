"""Bundled real catalogue sample (USNO ORB6 orbits and WDS rows); see README.md here."""
