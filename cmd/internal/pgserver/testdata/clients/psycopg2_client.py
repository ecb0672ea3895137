"""psycopg2 (Debian's python3-psycopg2) against plumb serve: client-side
parameters, a named (server-side) cursor read itersize rows at a time,
copy_expert both ways, and diagnose over the demo's shops."""
import io
import os

import psycopg2

from matrix import Matrix, dsn, expect

m = Matrix("psycopg2")
conn = psycopg2.connect(dsn())
cur = conn.cursor()
shops = os.environ["PLUMB_SHOPS"]


def parameters():
    cur.execute("SELECT %s::INTEGER + 1, %s || '!', %s * 2, %s", (41, "plumb", 1.25, None))
    return expect(cur.fetchone(), (42, "plumb!", 2.5, None))


def diagnose():
    cur.execute("SELECT shop, product, rank FROM diagnose(%s, by := ['shop', 'product'], at := 'day', value := 'units') ORDER BY rank LIMIT 3", (shops,))
    rows = cur.fetchall()
    expect(len(rows), 3)
    return rows[0]


def named_cursor():
    conn.rollback()
    named = conn.cursor(name="walk")
    named.itersize = 100
    named.execute("SELECT i, i * 2 AS twice FROM range(1000) t(i) ORDER BY i")
    total = sum(r[1] for r in named)
    named.close()
    conn.commit()
    return expect(total, 999000)


def copy_out():
    buf = io.StringIO()
    cur.copy_expert("COPY (SELECT i, 'x' || i AS s, NULL AS n FROM range(3) t(i) ORDER BY i) TO STDOUT WITH CSV HEADER", buf)
    conn.commit()
    return expect(buf.getvalue(), "i,s,n\n0,x0,\n1,x1,\n2,x2,\n")


def copy_in():
    cur.execute("CREATE TABLE pg2_in (i INTEGER, s VARCHAR, d DATE)")
    cur.copy_expert("COPY pg2_in FROM STDIN WITH (FORMAT csv, HEADER true)", io.StringIO("i,s,d\n1,one,2025-01-02\n2,\"tw,o\",\n"))
    conn.commit()
    cur.execute("SELECT i, s, d::VARCHAR FROM pg2_in ORDER BY i")
    return expect(cur.fetchall(), [(1, "one", "2025-01-02"), (2, "tw,o", None)])


def copy_in_text():
    cur.copy_expert("COPY pg2_in (i, s) FROM STDIN", io.StringIO("3\tthree\\ttab\n4\t\\N\n"))
    conn.commit()
    cur.execute("SELECT s FROM pg2_in WHERE i >= 3 ORDER BY i")
    return expect(cur.fetchall(), [("three\ttab",), (None,)])


def transaction_rollback():
    cur.execute("INSERT INTO pg2_in VALUES (9, 'gone', NULL)")
    conn.rollback()
    cur.execute("SELECT count(*) FROM pg2_in WHERE i = 9")
    return expect(cur.fetchone(), (0,))


def error_then_recover():
    try:
        cur.execute("SELECT * FROM no_such_table")
    except psycopg2.errors.UndefinedTable:
        conn.rollback()
    cur.execute("SELECT 1")
    return expect(cur.fetchone(), (1,))


m.check("parameters (client-side)", parameters)
m.check("diagnose(%s, ...) on a relative path", diagnose)
m.check("named cursor, itersize 100", named_cursor)
m.check("copy_expert COPY TO STDOUT csv", copy_out)
m.check("copy_expert COPY FROM STDIN csv", copy_in)
m.check("copy_expert COPY FROM STDIN text", copy_in_text)
m.check("rollback", transaction_rollback)
m.check("error, rollback, go on", error_then_recover)
conn.close()
m.finish()
