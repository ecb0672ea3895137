"""SQLAlchemy 1.4 (psycopg2 dialect) with pandas, as a notebook uses them:
create_engine, read_sql of a diagnose query, to_sql with NaN, None and NaT
and back, and the inspector's table, column and view lists."""
import math
import os

import pandas as pd
import sqlalchemy as sa

from matrix import Matrix, expect, url

m = Matrix("SQLAlchemy + pandas")
engine = sa.create_engine(url("psycopg2"))
shops = os.environ["PLUMB_SHOPS"]


def connect():
    with engine.connect() as c:
        return c.execute(sa.text("SELECT 1")).scalar()


def read_sql():
    df = pd.read_sql("SELECT shop, product, rank, stationary, violations, adf_p_value FROM diagnose('%s', by := ['shop', 'product'], at := 'day', value := 'units') ORDER BY rank" % shops, engine)
    expect(len(df), 12)
    return "%d rows, dtypes %s" % (len(df), ",".join(str(t) for t in df.dtypes))


def to_sql_and_back():
    df = pd.DataFrame({
        "k": [1, 2, 3],
        "x": [1.5, float("nan"), 3.0],
        "s": ["a", None, "c"],
        "t": pd.to_datetime(["2025-01-01 10:00", None, "2025-01-03"]),
    })
    df.to_sql("frame", engine, index=False, if_exists="replace")
    back = pd.read_sql("SELECT * FROM frame ORDER BY k", engine)
    expect(list(back["k"]), [1, 2, 3])
    expect(math.isnan(back["x"][1]) and back["x"][2] == 3.0, True)
    expect(back["s"][1] is None, True)
    expect(pd.isna(back["t"][1]) and back["t"][2] == pd.Timestamp("2025-01-03"), True)
    return "3 rows round-tripped"


def read_sql_params():
    df = pd.read_sql(sa.text("SELECT k FROM frame WHERE s = :s"), engine, params={"s": "c"})
    return expect(list(df["k"]), [3])


def table_names():
    names = sa.inspect(engine).get_table_names()
    expect("frame" in names, True)
    return names


def columns():
    cols = sa.inspect(engine).get_columns("frame")
    got = [(c["name"], type(c["type"]).__name__) for c in cols]
    return expect(got, [("k", "BIGINT"), ("x", "DOUBLE_PRECISION"), ("s", "TEXT"), ("t", "TIMESTAMP")])


def view_names():
    with engine.begin() as c:
        c.execute(sa.text("CREATE OR REPLACE VIEW frame_view AS SELECT k FROM frame"))
    names = sa.inspect(engine).get_view_names()
    return expect(names, ["frame_view"])


def stream_results():
    with engine.connect() as c:
        result = c.execution_options(stream_results=True).execute(sa.text("SELECT i FROM range(2000) t(i)"))
        return expect(sum(r[0] for r in result), 1999000)


m.check("create_engine + connect", connect)
m.check("read_sql(diagnose(...))", read_sql)
m.check("to_sql with NaN/None/NaT, read back", to_sql_and_back)
m.check("read_sql with a bound parameter", read_sql_params)
m.check("inspect().get_table_names()", table_names)
m.check("inspect().get_columns()", columns)
m.check("inspect().get_view_names()", view_names)
m.check("stream_results (server-side cursor)", stream_results)
m.finish()
