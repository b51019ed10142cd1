"""The late-and-close filter + per-passer group-by (counts and sums only: no
baselines, shrinkage or intervals) in pandas, polars (lazy) and DuckDB, on
data already in memory, for the benchmark's comparison.
usage: python3 pandas_split.py SCORED.parquet
prints one line per engine: `p50_ms ENGINE MS` (an engine that is missing
prints `missing ENGINE REASON`)."""
import sys
import time

import pandas as pd

COLS = ["period", "clock", "off_score", "def_score", "kind", "passer", "complete", "epa", "wpa"]
RUNS = 30

df = pd.read_parquet(sys.argv[1], columns=COLS)
secs = df["clock"].str.split(":", expand=True).astype(int)
df["clock_s"] = secs[0] * 60 + secs[1]
df["margin"] = df["off_score"] - df["def_score"]
df = df.drop(columns=["clock", "off_score", "def_score"])


def p50(f):
    f()  # warm-up
    times = []
    for _ in range(RUNS):
        t = time.perf_counter()
        f()
        times.append((time.perf_counter() - t) * 1000)
    times.sort()
    return times[len(times) // 2]


def pandas_split():
    late = ((df["period"] == 4) & (df["clock_s"] <= 450)) | (df["period"] >= 5)
    sel = df[df["kind"].isin(["pass", "sack", "scramble"]) & late & (df["margin"].abs() <= 8)]
    g = sel.groupby("passer")
    return g.agg(dropbacks=("kind", "size"), complete=("complete", "mean"), epa=("epa", "mean"), wpa=("wpa", "sum"))


print(f"p50_ms pandas {p50(pandas_split):.3f}", flush=True)

try:
    import polars as pl

    lf = pl.from_pandas(df).lazy()

    def polars_split():
        late = ((pl.col("period") == 4) & (pl.col("clock_s") <= 450)) | (pl.col("period") >= 5)
        q = (
            lf.filter(pl.col("kind").is_in(["pass", "sack", "scramble"]) & late & (pl.col("margin").abs() <= 8))
            .group_by("passer")
            .agg(pl.len().alias("dropbacks"), pl.col("complete").mean(), pl.col("epa").mean(), pl.col("wpa").sum())
        )
        return q.collect()

    print(f"p50_ms polars {p50(polars_split):.3f}", flush=True)
except ImportError as e:
    print(f"missing polars {e}")

try:
    import duckdb

    con = duckdb.connect()
    con.register("frame", df)
    con.execute("CREATE TABLE snaps AS SELECT * FROM frame")
    con.unregister("frame")
    sql = """
        SELECT passer, count(*) AS dropbacks, avg(complete::DOUBLE) AS complete, avg(epa) AS epa, sum(wpa) AS wpa
        FROM snaps
        WHERE kind IN ('pass', 'sack', 'scramble')
          AND ((period = 4 AND clock_s <= 450) OR period >= 5)
          AND abs(margin) <= 8
        GROUP BY passer
    """

    def duckdb_split():
        return con.execute(sql).fetchall()

    print(f"p50_ms duckdb {p50(duckdb_split):.3f}", flush=True)
except ImportError as e:
    print(f"missing duckdb {e}")
