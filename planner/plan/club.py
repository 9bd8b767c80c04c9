"""Club sessions: several telescopes, one night, the targets shared out.

The **matrix** has one row per pair that at least one scope splits tonight
(above the horizon long enough in the dark) and, per scope, the verdict and
margin at the pair's best time.

**Sharing rule** (a project choice, stated so club members know why they got
their list):

1. a scope splits a pair *comfortably* when its verdict is ``split`` and its
   margin is at least ``share_margin`` (default 1.5);
2. pairs are taken in order of their best score over the scopes;
3. each pair goes to the **smallest aperture that splits it comfortably** -
   the big scopes are kept for what only they can do;
4. *balancing*: when that scope's list is already longer than the shortest
   list among the other scopes that split the pair comfortably by more than
   ``slack`` pairs (default 2), the pair goes to that shorter list instead;
5. a pair no scope splits comfortably goes to the scope with the largest
   margin;
6. near misses ("challenges", with ``--challenges``) that no scope splits go
   to the scope with the largest margin on them.

Each scope's share is then scheduled on its own, so every scope has a list
through the night.
"""

from __future__ import annotations

import numpy as np
import pandas as pd


def share(judged: list, share_margin: float = 1.5, slack: int = 2):
    """Matrix and assignment for ``judged``: one :class:`planner.plan.night.JudgedScope`
    per telescope (``name``, ``telescope``, ``table`` with ``verdict``, ``margin``,
    ``score`` and ``up``), all tables indexed alike.

    Returns ``(matrix, assign)`` where ``matrix`` is a DataFrame indexed like
    the pair table with ``wds_id``, ``discoverer``, ``components``,
    ``best_score``, ``assigned`` and per scope ``<name>`` (verdict) and
    ``<name> margin``; ``assign`` maps scope name -> list of pair index labels.
    """
    names = [j.name for j in judged]
    base = judged[0].table
    up = base["up"].to_numpy(bool)
    verdicts = np.stack([j.table["verdict"].astype(str).to_numpy() for j in judged], axis=1)
    margins = np.stack([j.table["margin"].to_numpy(float) for j in judged], axis=1)
    scores = np.stack([j.table["score"].to_numpy(float) for j in judged], axis=1)
    apert = np.array([j.telescope.aperture_mm for j in judged])
    splits = (verdicts == "split") & up[:, None]
    any_split = splits.any(axis=1)
    rows = np.flatnonzero(any_split)
    best = np.where(splits, scores, -np.inf).max(axis=1)
    order = rows[np.argsort(-best[rows], kind="stable")]
    comfy = splits & (np.nan_to_num(margins, nan=0.0) >= share_margin)
    size_order = np.argsort(apert, kind="stable")
    counts = np.zeros(len(names), int)
    assigned = np.full(len(base), -1)
    for r in order:  # loop over pairs that split (hundreds), after the vectorised judging
        ok = np.flatnonzero(comfy[r])
        if len(ok):
            ok = [k for k in size_order if k in set(ok)]
            pick = ok[0]
            shortest = min(ok, key=lambda k: (counts[k], apert[k]))
            if counts[pick] > counts[shortest] + slack:
                pick = shortest
        else:
            m = np.where(splits[r], margins[r], -np.inf)
            pick = int(np.argmax(m))
        assigned[r] = pick
        counts[pick] += 1
    # near misses that no scope splits are rows too (assigned to none), so the matrix holds every
    # pair a scope counts as split or near, as the scopes' header counts do
    near_any = ((verdicts == "challenge") & up[:, None]).any(axis=1) & ~any_split
    near_rows = np.flatnonzero(near_any)
    best_near = np.where((verdicts == "challenge") & up[:, None], scores, -np.inf).max(axis=1)
    best = np.where(any_split, best, best_near)
    rows = np.concatenate([order, near_rows[np.argsort(-best[near_rows], kind="stable")]])
    idx = base.index[rows]
    mat = pd.DataFrame({"wds_id": base["wds_id"].to_numpy()[rows],
                        "discoverer": base["discoverer"].to_numpy()[rows],
                        "components": base["components"].to_numpy()[rows],
                        "best_score": best[rows]}, index=idx)
    for k, n in enumerate(names):
        # "near" only for a near miss that is up in the dark, as the scopes' own counts
        mat[n] = np.where(splits[rows, k], "split",
                          np.where((verdicts[rows, k] == "challenge") & up[rows], "near", "-"))
        mat[f"{n} margin"] = margins[rows, k]
    mat["assigned"] = [names[a] if a >= 0 else "-" for a in assigned[rows]]
    assign = {n: list(base.index[assigned == k]) for k, n in enumerate(names)}
    return mat, assign


def share_challenges(judged: list) -> dict:
    """Near misses that no scope splits, each given to the scope with the largest margin on it."""
    names = [j.name for j in judged]
    base = judged[0].table
    up = base["up"].to_numpy(bool)
    verdicts = np.stack([j.table["verdict"].astype(str).to_numpy() for j in judged], axis=1)
    margins = np.stack([j.table["margin"].to_numpy(float) for j in judged], axis=1)
    chal = (verdicts == "challenge") & up[:, None] & ~((verdicts == "split").any(axis=1))[:, None]
    pick = np.argmax(np.where(chal, np.nan_to_num(margins, nan=-1.0), -np.inf), axis=1)
    has = chal.any(axis=1)
    return {n: list(base.index[has & (pick == k)]) for k, n in enumerate(names)}
