"""psycopg 3 (Debian's python3-psycopg) against plumb serve: server-side
parameter binding (untyped, date and array parameters, a parameter passed to
diagnose), binary results, a ServerCursor, copy both ways, and the error a
nested transaction() (a SAVEPOINT) gets."""
import datetime
import os

import psycopg
from psycopg.transaction import OutOfOrderTransactionNesting

from matrix import Matrix, dsn, expect

m = Matrix("psycopg 3")
conn = psycopg.connect(dsn(), autocommit=True)
shops = os.environ["PLUMB_SHOPS"]


def untyped():
    return expect(conn.execute("SELECT %s, %s + 1", ["plumb", 41]).fetchone(), ("plumb", 42))


def date_param():
    return expect(conn.execute("SELECT %s + 1", [datetime.date(2024, 2, 28)]).fetchone(), (datetime.date(2024, 2, 29),))


def array_param():
    # psycopg sends a list of str untyped, as PostgreSQL's docs for it say,
    # so the query names the array type.
    return expect(conn.execute("SELECT difference(%s), %s::text[]", [[1, 4, 9, 16], ["a", "b c", None]]).fetchone(), ([3.0, 5.0, 7.0], ["a", "b c", None]))


def diagnose_param():
    rows = conn.execute("SELECT shop, product, rank FROM diagnose(%s, by := ['shop', 'product'], at := 'day', value := %s) ORDER BY rank",
                        [shops, "units"]).fetchall()
    return expect(len(rows), 12)


def binary_results():
    cur = conn.cursor(binary=True)
    row = cur.execute("SELECT 42::INTEGER, 2.5::DOUBLE, 'x', DATE '2025-03-04', [1.5, 2]::DOUBLE[], uuid '6ba7b810-9dad-11d1-80b4-00c04fd430c8'").fetchone()
    return expect(row[:5], (42, 2.5, "x", datetime.date(2025, 3, 4), [1.5, 2.0])) and str(row[5])


def server_cursor():
    with conn.transaction():
        cur = conn.cursor(name="stream")
        cur.itersize = 50
        cur.execute("SELECT i FROM range(500) t(i) ORDER BY i")
        total = sum(r[0] for r in cur)
        cur.close()
    return expect(total, 124750)


def copy_in():
    conn.execute("CREATE TABLE pg3_in (i INTEGER, x DOUBLE, s VARCHAR)")
    with conn.cursor() as cur:
        with cur.copy("COPY pg3_in (i, x, s) FROM STDIN") as copy:
            for i in range(1000):
                copy.write_row((i, i / 4, None if i % 7 == 0 else "r%d" % i))
    return expect(conn.execute("SELECT count(*), count(s), sum(x) FROM pg3_in").fetchone(), (1000, 857, 124875.0))


def copy_in_binary():
    conn.execute("CREATE TABLE pg3_bin (i BIGINT, d DATE, s VARCHAR)")
    with conn.cursor() as cur:
        with cur.copy("COPY pg3_bin FROM STDIN (FORMAT BINARY)") as copy:
            copy.set_types(["int8", "date", "text"])
            copy.write_row((1, datetime.date(2025, 1, 2), "a"))
            copy.write_row((2, None, "b"))
    return expect(conn.execute("SELECT i, d, s FROM pg3_bin ORDER BY i").fetchall(), [(1, datetime.date(2025, 1, 2), "a"), (2, None, "b")])


def copy_out():
    with conn.cursor() as cur:
        with cur.copy("COPY (SELECT i, s FROM pg3_in ORDER BY i LIMIT 3) TO STDOUT") as copy:
            rows = list(copy.rows())
    return expect(rows, [("0", None), ("1", "r1"), ("2", "r2")])


def copy_out_binary():
    with conn.cursor() as cur:
        with cur.copy("COPY (SELECT i, x, s FROM pg3_in ORDER BY i LIMIT 2) TO STDOUT (FORMAT BINARY)") as copy:
            copy.set_types(["int4", "float8", "text"])
            rows = list(copy.rows())
    return expect(rows, [(0, 0.0, None), (1, 0.25, "r1")])


def nested_transaction():
    # The inner transaction() sends SAVEPOINT, which plumb refuses with
    # SQLSTATE 0A000; psycopg then reports the outer block's exit as out of
    # order, with the server's error as its context.
    try:
        with conn.transaction():
            with conn.transaction():
                pass
    except (psycopg.errors.FeatureNotSupported, OutOfOrderTransactionNesting) as e:
        cause = e if isinstance(e, psycopg.errors.FeatureNotSupported) else e.__context__
        if not isinstance(cause, psycopg.errors.FeatureNotSupported):
            raise AssertionError("no FeatureNotSupported behind %r" % e)
        return "%s (SQLSTATE %s): %s" % (type(cause).__name__, cause.sqlstate, str(cause).splitlines()[0][:60])
    raise AssertionError("nested transaction() was accepted")


def after_nested():
    return expect(conn.execute("SELECT 1").fetchone(), (1,))


m.check("untyped parameters (server-side binding)", untyped)
m.check("date parameter", date_param)
m.check("array parameters", array_param)
m.check("parameters into diagnose", diagnose_param)
m.check("binary results, UUID", binary_results)
m.check("ServerCursor, itersize 50", server_cursor)
m.check("copy FROM STDIN (write_row)", copy_in)
m.check("copy FROM STDIN binary", copy_in_binary)
m.check("copy TO STDOUT (rows)", copy_out)
m.check("copy TO STDOUT binary", copy_out_binary)
m.check("nested transaction() (savepoint)", nested_transaction)
m.check("session usable after it", after_nested)
conn.close()
m.finish()
