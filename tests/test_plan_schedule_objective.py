"""The scheduler's objective tested by behaviour (issue 16 item 5).

Constructed cases with a made-up sky (``altaz_fn`` returns fixed positions), so that
each term of the objective documented in planner/plan/schedule.py decides the order
on its own:

* urgency: a pair about to set is taken before a better-ranked circumpolar one, and
  only because of the urgency term (weight 0 gives the other order and loses the pair);
* slew: with weight 0 the better-ranked pair across the sky comes next; with a slew
  weight > 0 the nearby one does.

The weights are the project's documented choices (common practice, no source); what is
checked is the behaviour they are meant to produce, not their values.
"""

from __future__ import annotations

import numpy as np

from planner.plan.schedule import greedy_schedule

T0 = np.datetime64("2026-12-05T18:00", "ns")
MIN = np.timedelta64(60_000_000_000, "ns")
NAT = np.datetime64("NaT", "ns")


def sky(alt_az, set_utc=None):
    """altaz_fn for fixed positions; a pair with a set time is at -10 deg from then on."""
    alt_az = np.asarray(alt_az, float)

    def altaz_fn(idx, when):
        idx = np.asarray(idx, int)
        alt = alt_az[idx, 0].copy()
        az = alt_az[idx, 1].copy()
        if set_utc is not None:
            s = np.asarray(set_utc, "datetime64[ns]")[idx]
            alt = np.where(~np.isnat(s) & (np.datetime64(when, "ns") >= s), -10.0, alt)
        return alt, az
    return altaz_fn


def run(score, alt_az, best, sets, weights=None, slots=4):
    return greedy_schedule(
        np.zeros(len(score)), np.zeros(len(score)), np.asarray(score, float),
        np.asarray(best, "datetime64[ns]"), np.asarray(sets, "datetime64[ns]"),
        T0, T0 + slots * 30 * MIN, minutes=30, altaz_fn=sky(alt_az, sets), min_alt_deg=20.0,
        limit=len(score), weights=weights)


def test_a_pair_about_to_set_is_taken_before_a_better_ranked_circumpolar_one():
    # pair 0: circumpolar, ranked first; pair 1: ranked second, sets 40 min into the night.
    # Both are at their best now, so only the urgency term separates them.
    score = [1.0, 0.9]
    alt_az = [[60.0, 0.0], [40.0, 250.0]]
    best = [T0 + 15 * MIN, T0 + 15 * MIN]
    sets = [NAT, T0 + 40 * MIN]
    got = run(score, alt_az, best, sets)
    assert list(got["cand"]) == [1, 0]
    # the setting pair's first slot ends before it sets
    assert got["slot_end_utc"].iloc[0] <= sets[1]
    # without the urgency term the better-ranked pair goes first and the other one is lost
    no_urgency = run(score, alt_az, best, sets, weights={"urgency": 0.0})
    assert list(no_urgency["cand"]) == [0]


def test_urgency_grows_as_the_setting_time_nears():
    # the same two pairs; the closer pair 1 is to setting, the larger its objective
    objectives = []
    for minutes_left in (40, 60, 90):
        got = run([1.0, 0.9], [[60.0, 0.0], [40.0, 250.0]], [T0 + 15 * MIN] * 2,
                  [NAT, T0 + minutes_left * MIN])
        row = got[got["cand"] == 1].iloc[0]
        objectives.append(row["objective"] if row["slot_start_utc"] == T0 else -np.inf)
    # 40 min left: taken first with the largest objective; 90 min: it can wait
    assert objectives[0] > objectives[1]
    assert objectives[0] > 1.5 and objectives[2] == -np.inf


def test_slew_weight_changes_the_order():
    # pair 0 is taken first (best ranked).  Then pair 1 (ranked second) lies across the sky
    # (az 180, 80 deg away over the zenith) and pair 2 (ranked third) next to pair 0 (az 5).
    score = [1.0, 0.95, 0.9]
    alt_az = [[50.0, 0.0], [50.0, 180.0], [50.0, 5.0]]
    best = [NAT, NAT, NAT]
    sets = [NAT, NAT, NAT]
    no_slew = run(score, alt_az, best, sets, weights={"slew": 0.0})
    with_slew = run(score, alt_az, best, sets, weights={"slew": 0.4})
    assert list(no_slew["cand"]) == [0, 1, 2]
    assert list(with_slew["cand"]) == [0, 2, 1]
    # the slew reported is the great-circle angle on the sky (spherical law of cosines):
    # from (50, 0) to (50, 180) is 180 - 2 x 50 = 80 deg
    near = np.degrees(np.arccos(np.sin(np.radians(50)) ** 2
                                + np.cos(np.radians(50)) ** 2 * np.cos(np.radians(5))))
    assert abs(with_slew["slew_deg"].iloc[1] - near) < 1e-9      # about 3.2 deg
    far = no_slew[no_slew["cand"] == 1]["slew_deg"].iloc[0]
    assert abs(far - 80.0) < 1e-9
