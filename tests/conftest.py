"""Shared fixtures: every test must leave the working precision as it found it."""

import pytest
from flint import ctx


@pytest.fixture(autouse=True)
def _precision_is_restored():
    before = (ctx.prec, ctx.cap)
    yield
    after = (ctx.prec, ctx.cap)
    assert after == before, f"test leaked a precision change: {before} -> {after}"
