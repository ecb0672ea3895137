"""The table every Python client script prints: one row per operation, its
result, and an exit status of 1 when any operation failed."""
import os
import sys
import traceback


def dsn():
    return "host=%s port=%s user=%s password=%s dbname=plumb" % (
        os.environ["PLUMB_HOST"], os.environ["PLUMB_PORT"],
        os.environ["PLUMB_USER"], os.environ["PLUMB_PASSWORD"])


def url(driver):
    return "postgresql+%s://%s:%s@%s:%s/plumb" % (
        driver, os.environ["PLUMB_USER"], os.environ["PLUMB_PASSWORD"],
        os.environ["PLUMB_HOST"], os.environ["PLUMB_PORT"])


class Matrix:
    def __init__(self, client):
        self.client = client
        self.rows = []

    def check(self, operation, fn):
        """Runs fn; its return value (or the exception) is the result."""
        try:
            result = fn()
            self.rows.append((operation, "ok", "" if result is None else str(result)))
        except Exception as e:  # the table reports every failure
            detail = "%s: %s" % (type(e).__name__, str(e).strip().splitlines()[0] if str(e).strip() else "")
            if os.environ.get("PLUMB_TRACE"):
                traceback.print_exc()
            self.rows.append((operation, "FAIL", detail))

    def finish(self):
        width = max(len(r[0]) for r in self.rows)
        print("%s | %s | %s" % ("operation".ljust(width), "result", "detail"))
        print("%s-+-%s-+-%s" % ("-" * width, "-" * 6, "-" * 6))
        for op, res, detail in self.rows:
            print("%s | %s | %s" % (op.ljust(width), res.ljust(6), detail[:160]))
        failed = sum(1 for r in self.rows if r[1] != "ok")
        print("%s: %d passed, %d failed" % (self.client, len(self.rows) - failed, failed))
        sys.exit(1 if failed else 0)


def expect(got, want):
    if got != want:
        raise AssertionError("got %r, want %r" % (got, want))
    return got
