"""One vocabulary of options for every command, and the checks made before any work starts.

Every command that

* aims at a target takes ``--digits D`` (enclosure width at most 10^-D) and
  ``--width W`` as an alias of the same thing (:func:`add_target`);
* produces a result takes ``--json PATH`` (``-`` for standard output)
  (:func:`add_json`);
* writes files takes ``--out DIR`` (:func:`add_out`), and ``--name BASE``
  where the file names are not fixed (:func:`add_name`);
* can run for more than a few seconds shows a progress bar on a terminal
  (tqdm; never when standard error is not a terminal) and takes
  ``--no-progress`` (:func:`add_progress`, :func:`progress`);
* estimates its cost from the input and refuses beyond stated limits, one
  line giving the estimate and the limit; ``--limit KEY=N`` raises a limit
  (:func:`add_limits`, :class:`Limits`).

Outputs are checked before computing (:func:`check_outputs`): an empty
``--json``, a ``--json`` naming a folder, an ``--out`` naming a file, a
``--name`` with a path in it are refused at once, not after the work.

A command module adopts these by calling the ``add_*`` helpers in its
``register`` and ``check_outputs(args)`` first thing in its ``run_*``.
"""

from __future__ import annotations

import json
import math
import os
import sys
from contextlib import contextmanager

from ..errors import BadInput

MAX_INT_DIGITS = 30  # integers on the command line are at most this long

# Stated limits: what a command estimates before it starts, and the default ceiling.
# Each is raised by ``--limit KEY=N``.  The defaults keep one command within
# minutes and a few GB on a 2-core machine (measured; see docs/batch.md).
DEFAULT_LIMITS = {
    "races": 100_000,          # races in one table
    "l-functions": 5_000,      # L-functions one race or table needs (upper estimate)
    "conductor": 2_000,        # the largest modulus of a race over Q (measured: the residue
                               # race mod 1009, one L-function of conductor 1009, 2 digits:
                               # 153 s; mod 10007: more than 300 s; 2 cores under load)
    "residue-modulus": 100_000_000,  # the modulus of a residue race: its real characters only
                               # (2^r - 1 L-functions, conductors up to q, smoothed sums of cost
                               # ~ sqrt(conductor) each; measured: mod 4849845, 127 L-functions,
                               # see bench/bench_huge_residue.py)
    "memory-mb": 4_000,        # estimated memory of a table's plan and results
    "field": 10_000_000,       # elements of the largest finite field a curve's point counts need
    "group": 1_000_000,        # order of a character group mod m in F_q[t]
    "members": 20_000,         # curves in one twist family run
    "claims": 10_000,          # claims in one claims file
    "files": 10_000,           # certificates given to verify at once
    "ec-conductor": 200_000,   # conductor of an elliptic curve over Q (measured, ecrace at 4
                               # digits, 2 cores under load: N = 3824 5.4 s CPU, N = 51056
                               # 19.6 s CPU; the cost of a Z evaluation grows like sqrt(N))
    "zeros": 20_000,           # zeros of one L-function to isolate (ecrace, lirace; estimated
                               # from the planned height and the zero-counting function)
    "primes": 1_000_000,       # primes of the observed race (ecrace --observe X, pi(X) is at
                               # most 1.25506 X / log X; measured: X = 10^6, 78498 primes, 3 s;
                               # X = 10^7, 664579 primes, 46 s CPU, 150 MB)
}

MAX_HEIGHT = 200.0  # heights on the command line (ordinates t of the critical line)


# -- integers and targets -------------------------------------------------------

def parse_int(text, what: str, low: int | None = None, high: int | None = None) -> int:
    """An integer from the command line, in [low, high]; BadInput otherwise (never a traceback)."""
    s = str(text).strip()
    if len(s.lstrip("+-")) > MAX_INT_DIGITS:
        raise BadInput(f"{what} must be an integer of at most {MAX_INT_DIGITS} digits "
                       f"(got {len(s)} characters)")
    try:
        v = int(s)
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be an integer, got {_short(text)!r}") from None
    if low is not None and v < low:
        raise BadInput(f"{what} must be at least {low}, got {v}")
    if high is not None and v > high:
        raise BadInput(f"{what} must be at most {high}, got {v}")
    return v


def parse_float(text, what: str, low: float | None = None, high: float | None = None,
                open_low: bool = False) -> float:
    """A finite float in a range; BadInput otherwise."""
    s = str(text).strip()
    if len(s) > 40:
        raise BadInput(f"{what} must be a number of at most 40 characters")
    try:
        v = float(s)
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be a number, got {_short(text)!r}") from None
    if not math.isfinite(v):
        raise BadInput(f"{what} must be finite, got {_short(text)!r}")
    if low is not None and (v < low or (open_low and v == low)):
        raise BadInput(f"{what} must be {'above' if open_low else 'at least'} {low:g}, got {v:g}")
    if high is not None and v > high:
        raise BadInput(f"{what} must be at most {high:g}, got {v:g}")
    return v


def parse_height(text, what: str, high: float = MAX_HEIGHT) -> float:
    """A height (an ordinate t >= 0 of the critical line) at most ``high``; BadInput otherwise.

    A height that overflows a float (``1e400``), is not finite, or lies beyond the
    stated limit is refused in one line that names the height and the limit.
    """
    from decimal import Decimal, InvalidOperation

    s = str(text).strip()
    if len(s) > 40:
        raise BadInput(f"{what} must be a number of at most 40 characters")
    try:
        dec = Decimal(s)
    except (InvalidOperation, ValueError):
        raise BadInput(f"{what} must be a number (a height t >= 0), got {_short(text)!r}") from None
    if not dec.is_finite():
        raise BadInput(f"{what} must be a finite height, got {_short(text)!r}")
    if dec > Decimal(repr(float(high))):
        raise BadInput(f"{what} {_short(s)}: the height exceeds the limit {high:g} "
                       f"(heights here are ordinates t with 0 <= t <= {high:g})")
    if dec < 0:
        raise BadInput(f"{what} must be a height t >= 0, got {_short(s)}")
    return float(dec)


def _short(text) -> str:
    s = str(text)
    return s if len(s) <= 40 else s[:37] + "..."


def add_target(p, default_digits: int, max_digits: int, what: str = "enclosure") -> None:
    """``--digits D`` (width at most 10^-D) and ``--width W`` (alias: width at most W)."""
    g = p.add_mutually_exclusive_group()
    g.add_argument("--digits", "-d", default=None, metavar="D",
                   help=f"target: {what} width at most 10^-D (1..{max_digits}; default {default_digits})")
    g.add_argument("--width", default=None, metavar="W",
                   help="target as a width (alias of --digits: at most W, 0 < W < 1)")
    p.set_defaults(_digits_default=default_digits, _digits_max=max_digits)


def target_digits(args) -> int:
    """The target as digits D (from --digits, or the smallest D with 10^-D <= --width)."""
    hi = getattr(args, "_digits_max", 60)
    if getattr(args, "width", None) is not None:
        w = parse_float(args.width, "--width", 0.0, 1.0, open_low=True)
        if w >= 1:
            raise BadInput(f"--width must lie in (0, 1), got {w:g}")
        d = max(1, math.ceil(-math.log10(w) - 1e-12))
        if d > hi:
            raise BadInput(f"--width {w:g} asks for {d} digits; at most {hi} here")
        return d
    d = args.digits if args.digits is not None else args._digits_default
    return parse_int(d, "--digits", 1, hi)


def target_width(args) -> float:
    """The target as a width (from --width, or 10^-D from --digits)."""
    if getattr(args, "width", None) is not None:
        w = parse_float(args.width, "--width", 0.0, 1.0, open_low=True)
        if w >= 1:
            raise BadInput(f"--width must lie in (0, 1), got {w:g}")
        return w
    return 10.0 ** (-target_digits(args))


# -- outputs --------------------------------------------------------------------

def add_json(p, what: str = "the machine-readable result") -> None:
    p.add_argument("--json", metavar="PATH", nargs="?", const="-", default=None,
                   help=f"write {what} as JSON to PATH (- or no PATH: standard output)")


def add_out(p, default: str | None = "reports", required: bool = False,
            what: str = "output folder") -> None:
    p.add_argument("--out", "-o", metavar="DIR", default=default, required=required,
                   help=f"{what}" + (f" (default {default}/)" if default else ""))


def add_name(p) -> None:
    p.add_argument("--name", metavar="BASE",
                   help="base name of the files written (letters, digits, . _ -; no folder)")


def check_json_path(path: str | None) -> None:
    if path is None or path == "-":
        return
    if not str(path).strip():
        raise BadInput("--json needs a file name (or - for standard output), got an empty string")
    if os.path.isdir(path):
        raise BadInput(f"--json {path}: is a folder; give a file name")
    _check_parent_writable(path, "--json")


def check_out_dir(path: str | None, what: str = "--out") -> None:
    if path is None:
        return
    if not str(path).strip():
        raise BadInput(f"{what} needs a folder name, got an empty string")
    if os.path.exists(path) and not os.path.isdir(path):
        raise BadInput(f"{what} {path}: exists and is not a folder")
    if os.path.isdir(path):
        if not os.access(path, os.W_OK | os.X_OK):
            raise BadInput(f"{what} {path}: folder is not writable")
        return
    _check_parent_writable(os.path.join(path, "x"), what)


def _check_parent_writable(path: str, what: str) -> None:
    parent = os.path.dirname(os.path.abspath(path))
    # walk up to the first existing ancestor: it must be a writable folder
    while not os.path.exists(parent):
        up = os.path.dirname(parent)
        if up == parent:
            break
        parent = up
    if not os.path.isdir(parent):
        raise BadInput(f"{what} {path}: {parent} is not a folder")
    if not os.access(parent, os.W_OK | os.X_OK):
        raise BadInput(f"{what} {path}: cannot write in {parent}")


def check_name(name: str | None) -> None:
    if name is None:
        return
    import re

    if not re.fullmatch(r"[A-Za-z0-9][A-Za-z0-9._-]{0,119}", name) or ".." in name:
        raise BadInput(f"--name {_short(name)!r}: use a plain base name (letters, digits, . _ -; "
                       "no folder, no '..')")


def check_outputs(args) -> None:
    """Refuse bad output options before any computation."""
    check_json_path(getattr(args, "json", None))
    check_out_dir(getattr(args, "out", None))
    check_name(getattr(args, "name", None))


def write_json(obj, path: str, kind: str | None = None) -> None:
    """Write ``obj`` as JSON to ``path`` atomically, or to standard output for ``-``.

    A document that is not already a certify document is put in the common envelope
    (``schema``, ``schema_version``, ``kind``) so that one schema validates every output.
    """
    from ..io import write_atomic

    if kind is not None and not (isinstance(obj, dict) and "schema" in obj):
        from ..certificate.model import envelope

        obj = envelope(kind, obj if isinstance(obj, dict) else {"items": obj})
    text = json.dumps(obj, indent=2, default=str)
    if path == "-":
        sys.stdout.write(text + "\n")
    else:
        write_atomic(path, text + "\n")


# -- limits ---------------------------------------------------------------------

def add_limits(p) -> None:
    p.add_argument("--limit", action="append", metavar="KEY=N", default=None,
                   help="raise a size limit checked before work starts, e.g. --limit races=1e6 "
                   f"(keys: {', '.join(DEFAULT_LIMITS)})")


class Limits:
    """Stated limits, with those raised on the command line."""

    def __init__(self, items=None):
        self.values = dict(DEFAULT_LIMITS)
        for item in items or []:
            key, sep, val = str(item).partition("=")
            key = key.strip()
            if not sep or key not in DEFAULT_LIMITS:
                raise BadInput(f"--limit {_short(item)!r}: use KEY=N with KEY one of "
                               f"{', '.join(DEFAULT_LIMITS)}")
            self.values[key] = parse_float(val, f"--limit {key}", 0.0, 1e30)

    @classmethod
    def of(cls, args) -> "Limits":
        return cls(getattr(args, "limit", None))

    def require(self, key: str, estimate: float, what: str) -> None:
        """Refuse (BadInput, one line) when ``estimate`` exceeds the limit ``key``."""
        lim = self.values[key]
        if estimate > lim:
            raise BadInput(f"{what}: estimated {key} {_num(estimate)} exceeds the limit {_num(lim)} "
                           f"(raise it with --limit {key}=N)")


def _num(x) -> str:
    if isinstance(x, int) and x >= 10**7:
        digits = len(str(x)) if x < 10**4000 else None
        if digits is None:
            return "more than 10^4000"
        return f"{int(str(x)[:3]) / 100:.2f}e+{digits - 1:02d}"
    if isinstance(x, int) or float(x).is_integer() and x < 1e7:
        return f"{int(x)}"
    return f"{x:.3g}"


# -- progress -------------------------------------------------------------------

def add_progress(p) -> None:
    p.add_argument("--no-progress", action="store_true",
                   help="no progress bar (it is shown only when standard error is a terminal)")


def progress_enabled(args) -> bool:
    return not getattr(args, "no_progress", False) and sys.stderr.isatty()


@contextmanager
def progress(total: int, desc: str, enabled: bool = True, unit: str = "it"):
    """A tqdm bar on standard error (disabled when not a terminal); yields an object with update()."""
    from tqdm import tqdm

    bar = tqdm(total=total, desc=desc, unit=unit, file=sys.stderr, leave=False,
               disable=not (enabled and sys.stderr.isatty()), dynamic_ncols=True)
    try:
        yield bar
    finally:
        bar.close()


@contextmanager
def stages(desc: str, enabled: bool = True):
    """A progress display for a computation in stages: yields ``say(message)``.

    On a terminal (tqdm on standard error) it shows ``desc: message`` and the
    elapsed time, refreshed twice a second; ``say`` switches the message at each
    stage.  When standard error is not a terminal, or ``enabled`` is false,
    nothing is written.
    """
    with working(desc, enabled) as bar:
        def say(message: str) -> None:
            bar.set_description_str(f"{desc}: {message}", refresh=not bar.disable)

        yield say


def check_race_size(question, limits: "Limits", what: str) -> None:
    """Refuse a race over Q whose L-function count exceeds the limit (estimated from q)."""
    from ..batch.limits import race_l_functions

    if getattr(question, "kind", "") == "ecq-trace-sum":  # a curve over Q: its conductor
        from ..certificate.ecq import LIMITS as ECQ_LIMITS
        from ..source.ellcurve import curve_from_ainvs

        from ..ecrace import MAX_CLAIM_DIGITS
        from .ecrace import check_ec_size

        E = curve_from_ainvs(question.ainvs)
        if E.conductor > ECQ_LIMITS["conductor"]:
            raise BadInput(f"{what} {question.label}: conductor {E.conductor} is above "
                           f"{ECQ_LIMITS['conductor']}, the largest a curve claim is certified for")
        check_ec_size(E, MAX_CLAIM_DIGITS, 0, limits)
        return
    if getattr(question, "kind", "") == "residues":
        # only the real characters carry weight: the modulus bounds their conductors
        limits.require("residue-modulus", question.modulus, f"{what} {question.label}")
    else:
        limits.require("conductor", question.modulus, f"{what} {question.label}")
    limits.require("l-functions", race_l_functions(question.modulus, question.kind),
                   f"{what} {question.label}")


@contextmanager
def working(desc: str, enabled: bool = True):
    """An elapsed-time display for one long computation (tqdm, on a terminal only).

    The bar has no total (the driver's rounds are not known in advance): it
    shows what is being computed and for how long, refreshed twice a second,
    and disappears when the work ends.
    """
    import threading

    from tqdm import tqdm

    on = enabled and sys.stderr.isatty()
    bar = tqdm(total=None, desc=desc, file=sys.stderr, leave=False, disable=not on,
               bar_format="{desc}: {elapsed}", dynamic_ncols=True)
    stop = threading.Event()

    def tick():
        while not stop.wait(0.5):
            bar.refresh()

    t = threading.Thread(target=tick, daemon=True) if on else None
    if t is not None:
        t.start()
    try:
        yield bar
    finally:
        stop.set()
        if t is not None:
            t.join(timeout=1)
        bar.close()
