"""The late-and-close filter + per-passer group-by in pandas, for the
benchmark's comparison. usage: python3 pandas_split.py SCORED.parquet"""
import sys
import time

import pandas as pd

df = pd.read_parquet(sys.argv[1], columns=["period", "clock", "off_score", "def_score", "kind", "passer", "complete", "epa", "wpa"])
secs = df["clock"].str.split(":", expand=True).astype(int)
df["clock_s"] = secs[0] * 60 + secs[1]
df["margin"] = df["off_score"] - df["def_score"]


def split():
    late = ((df["period"] == 4) & (df["clock_s"] <= 450)) | (df["period"] >= 5)
    sel = df[df["kind"].isin(["pass", "sack", "scramble"]) & late & (df["margin"].abs() <= 8)]
    g = sel.groupby("passer")
    return g.agg(dropbacks=("kind", "size"), complete=("complete", "mean"), epa=("epa", "mean"), wpa=("wpa", "sum"))


split()
times = []
for _ in range(20):
    t = time.perf_counter()
    split()
    times.append((time.perf_counter() - t) * 1000)
times.sort()
print(f"p50_ms {times[len(times) // 2]:.3f}")
