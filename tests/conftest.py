"""Shared fixtures: every test must leave the working precision as it found it."""

import pytest
from flint import ctx


@pytest.fixture(autouse=True)
def _precision_is_restored():
    before = (ctx.prec, ctx.cap)
    yield
    after = (ctx.prec, ctx.cap)
    assert after == before, f"test leaked a precision change: {before} -> {after}"


class _Terminal:
    """A text stream that says it is a terminal (what a user's stderr is)."""

    def __init__(self):
        import io

        self._buf = io.StringIO()

    def write(self, s):
        return self._buf.write(s)

    def flush(self):
        pass

    def isatty(self):
        return True

    def getvalue(self):
        return self._buf.getvalue()


@pytest.fixture
def make_terminal(monkeypatch):
    """A function that replaces standard error by a fresh terminal stream and returns it.

    Call it in the test's body: pytest's capture sets sys.stderr again when the call
    phase starts, so a fixture's own replacement would not last.
    """
    import sys

    def make():
        term = _Terminal()
        monkeypatch.setattr(sys, "stderr", term)
        return term

    return make
