"""How far can win probability from the snap's state alone get on the
simulated leagues? An upper mark for the late-and-close figure that no fit
on outcomes can have: a gradient-boosted regression of the oracle's own
values (`examples/wp_ceiling.rs --csv`) on the state the WP model reads
(overtime or not, seconds left, margin, down, to go, yard line, both sides'
timeouts, home, the line), fitted on every league's other seasons and
scored on each season in turn, as the calibration holds seasons out.

    python3 tools/state_ceiling.py 7=ceiling-7.csv 101=ceiling-101.csv 202=ceiling-202.csv

Each CSV is one league's `wp_ceiling --csv` (same seasons). Prints, per
league, the fitted WP's and the learned state function's Brier gain over
the margin-and-time baseline and mean squared distance to the oracle.
Needs pandas, numpy and scikit-learn (not the project's tests).
"""

import sys

import numpy as np
import pandas as pd
from sklearn.ensemble import HistGradientBoostingRegressor

STATE = ["overtime", "secs", "margin", "down", "to_go", "ball_on",
         "off_timeouts", "def_timeouts", "off_home", "line"]


def load(args):
    frames = []
    for arg in args:
        league, path = arg.split("=", 1)
        d = pd.read_csv(path)
        d["league"] = league
        frames.append(d)
    d = pd.concat(frames, ignore_index=True)
    d["overtime"] = (d.period > 4).astype(int)
    d["secs"] = np.where(d.period > 4, d.clock, d.secs_game)
    d["line"] = d.line.fillna(0.0)
    return d


def learned(d):
    """Each (league, season) scored by a fit on all the other rows."""
    out = np.full(len(d), np.nan)
    for (league, season), rows in d.groupby(["league", "season"]).groups.items():
        test = d.index.isin(rows)
        fit = HistGradientBoostingRegressor(
            max_iter=400, learning_rate=0.05, max_leaf_nodes=31,
            min_samples_leaf=50, early_stopping=False, random_state=0,
        ).fit(d.loc[~test, STATE], d.loc[~test, "oracle"])
        out[test] = np.clip(fit.predict(d.loc[test, STATE]), 0.001, 0.999)
    return out


def main(args):
    if not args:
        sys.exit(__doc__)
    d = load(args)
    d["state"] = learned(d)
    for league, t in d.groupby("league", sort=False):
        base = ((t.base - t.actual) ** 2).mean()
        for name in ["wp", "state"]:
            gain = 100 * (1 - ((t[name] - t.actual) ** 2).mean() / base)
            dist = ((t[name] - t.oracle) ** 2).mean()
            label = "fitted WP" if name == "wp" else "learned from the oracle"
            print(f"league {league}: {label:24} gain over baseline {gain:5.2f}%  "
                  f"distance to the oracle {dist:.5f}  ({len(t)} snaps)")


if __name__ == "__main__":
    main(sys.argv[1:])
