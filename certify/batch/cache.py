"""A persistent cache of certified spectra in SQLite.

Each entry holds one primitive L-function's spectrum (certified zeros, exact
power sums of all zeros, L(1/2, chi)) exactly as :mod:`certify.batch.serial`
writes it, keyed by the primitive character (conductor, Conrey label), the
isolation height, the zero-enclosure width, the number and accuracy of the
power sums, the search grid, and the software version that computed it.

Safety
------
* Every write is one SQLite transaction (``BEGIN IMMEDIATE`` ... ``COMMIT``)
  in write-ahead-log mode: a process killed at any instant leaves either the
  old state or the new one, never half an entry.
* Several processes (several batch runs, or a batch and an interactive
  session) may read and write the same file at once; writers wait for each
  other (busy timeout) and readers never block.
* Each entry carries the SHA-256 digest of its data; a damaged entry is
  reported and skipped on reading (``certify cache show --check`` lists
  them, ``certify cache prune --damaged`` removes them), never trusted.
* Entries written by another software version are ignored by ``load`` and
  can be removed by ``prune --other-versions``.

Location
--------
``$CERTIFY_CACHE`` if set, else ``$XDG_CACHE_HOME/certify/spectra.sqlite``,
else ``~/.cache/certify/spectra.sqlite``; any path can be given instead.

The cache stores certified data, but certifies nothing by itself: every
entry read is re-derived before use (:mod:`certify.batch.recheck`: power
sums and L(1/2) recomputed, each zero's sign change re-checked); an entry
that fails is skipped with a warning naming the file and recomputed.  The
race driver then re-runs every check (residual sums) on what it gets, and
results stay conditional on GRH and LI.
"""

from __future__ import annotations

import hashlib
import math
import os
import sqlite3
import time
import warnings
from dataclasses import dataclass

from .. import __version__
from ..arith import flint_version
from ..errors import BadInput, CertifyError
from ..spectrum.spectrum import PrimitiveSpectrum, SpectrumStore
from ..spectrum.zeros import ZeroList
from .recheck import recheck_spectrum
from .serial import FORMAT, decode, encode

SOFTWARE_VERSION = f"certify {__version__}; spectrum format {FORMAT}"
SCHEMA = 1
BUSY_TIMEOUT_MS = 120_000

_DDL = """
CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS spectra (
    id INTEGER PRIMARY KEY,
    conductor INTEGER NOT NULL,
    label INTEGER NOT NULL,
    parity INTEGER NOT NULL,
    version TEXT NOT NULL,
    height REAL NOT NULL,
    width REAL NOT NULL,
    moments INTEGER NOT NULL,
    moment_bits INTEGER NOT NULL,
    grid_fraction REAL NOT NULL,
    zeros INTEGER NOT NULL,
    z_calls INTEGER NOT NULL,
    seconds REAL NOT NULL,
    flint TEXT NOT NULL,
    created TEXT NOT NULL,
    digest TEXT NOT NULL,
    data BLOB NOT NULL
);
CREATE INDEX IF NOT EXISTS spectra_key ON spectra (conductor, label, version);
"""



def _fresh_copy(sp):
    """A copy of a spectrum whose lists can be extended without touching the original
    (arb and acb balls are immutable and shared)."""
    from dataclasses import replace

    zl = replace(sp.zeros, zeros=list(sp.zeros.zeros), brackets=list(sp.zeros.brackets))
    return replace(sp, zeros=zl, power_sums=list(sp.power_sums))

class CacheWarning(UserWarning):
    """A cache entry was skipped (damaged, or wrong on re-derivation); the work is redone."""


def default_cache_path() -> str:
    """Where the cache lives unless told otherwise (see the module docstring)."""
    env = os.environ.get("CERTIFY_CACHE")
    if env:
        return os.path.expanduser(env)
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    return os.path.join(base, "certify", "spectra.sqlite")


@dataclass(frozen=True)
class EntryInfo:
    """One row of the cache, without its data."""

    id: int
    conductor: int
    label: int
    parity: int
    version: str
    height: float
    width: float
    moments: int
    moment_bits: int
    grid_fraction: float
    zeros: int
    z_calls: int
    seconds: float
    flint: str
    created: str
    size: int

    @property
    def key(self) -> tuple[int, int]:
        return (self.conductor, self.label)

    def satisfies(self, height: float, width: float, moments: int, bits: int,
                  fraction: float = 0.25) -> bool:
        return (self.height >= height and self.width <= width and self.moments >= moments
                and self.moment_bits >= bits and self.grid_fraction <= fraction)


def spectrum_satisfies(sp: PrimitiveSpectrum | None, height: float, width: float, moments: int,
                       bits: int, fraction: float = 0.25) -> bool:
    """Whether ``sp`` holds at least what a request asks (so nothing need be computed)."""
    return (sp is not None and sp.height >= height and sp.zeros.width <= width
            and len(sp.power_sums) >= moments and sp.power_sum_bits >= bits
            and sp.zeros.grid_fraction <= fraction)


_COLS = ("id, conductor, label, parity, version, height, width, moments, moment_bits, "
         "grid_fraction, zeros, z_calls, seconds, flint, created, length(data)")


class SpectrumCache:
    """SQLite store of primitive spectra; a ``backend`` for :class:`SpectrumStore`.

    Parameters
    ----------
    path : str, optional
        The database file (created with its folder if missing); default
        :func:`default_cache_path`.
    version : str, optional
        Software version entries are written under and read back from.

    Notes
    -----
    The object is picklable (it holds only the path) and opens one
    connection per process, so it can be handed to worker processes.
    """

    def __init__(self, path: str | None = None, version: str = SOFTWARE_VERSION,
                 read_only: bool = False):
        self.path = os.path.abspath(os.path.expanduser(path or default_cache_path()))
        self.version = version
        self.read_only = read_only
        self._conn = None
        self._pid = None
        self.loads = 0
        self.saves = 0
        self.damaged: list[int] = []
        # (entry id, digest) -> (bytes, re-derived spectrum): an entry is re-derived once per
        # process, and again only if its bytes change
        self._rechecked: dict = {}
        # conductor -> (K, bits, {label: (S_1..S_K, L(1/2))}) re-derived by the batched path
        # for the characters of that conductor in this cache, once per process
        self._batched: dict = {}
        self.rechecked = 0
        self.recheck_seconds = 0.0

    def __getstate__(self):
        return {"path": self.path, "version": self.version, "read_only": self.read_only}

    def __setstate__(self, state):
        self.__init__(state["path"], state["version"], state.get("read_only", False))

    # -- connection ---------------------------------------------------------
    def connection(self) -> sqlite3.Connection:
        if self._conn is None or self._pid != os.getpid():
            if self.read_only:
                self._conn, self._pid = self._connect_read_only(), os.getpid()
                return self._conn
            folder = os.path.dirname(self.path)
            try:
                os.makedirs(folder, exist_ok=True)
                conn = sqlite3.connect(self.path, timeout=BUSY_TIMEOUT_MS / 1000,
                                       isolation_level=None)
                conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
                mode = conn.execute("PRAGMA journal_mode = WAL").fetchone()[0]
                conn.execute("PRAGMA synchronous = NORMAL" if mode == "wal" else
                             "PRAGMA synchronous = FULL")
                self._init_schema(conn)
            except sqlite3.Error as exc:
                raise BadInput(f"cache {self.path}: not a usable SQLite database ({exc})") from None
            self._conn, self._pid = conn, os.getpid()
        return self._conn

    def _connect_read_only(self) -> sqlite3.Connection:
        """A connection that writes nothing (a cache on a read-only file or folder)."""
        from urllib.parse import quote

        if not os.path.isfile(self.path):
            raise BadInput(f"no cache at {self.path}")
        last = None
        for flags in ("mode=ro", "mode=ro&immutable=1"):
            try:
                conn = sqlite3.connect(f"file:{quote(self.path)}?{flags}", uri=True,
                                       timeout=BUSY_TIMEOUT_MS / 1000, isolation_level=None)
                row = conn.execute("SELECT value FROM meta WHERE key='schema'").fetchone()
                if row is None or row[0] != str(SCHEMA):
                    raise BadInput(f"cache {self.path}: schema {row[0] if row else '(none)'} "
                                   f"is not {SCHEMA}")
                return conn
            except sqlite3.DatabaseError as exc:
                last = exc
        raise BadInput(f"cache {self.path}: not a readable SQLite database ({last})")

    def _init_schema(self, conn):
        conn.execute("BEGIN IMMEDIATE")
        try:
            for stmt in _DDL.strip().split(";"):
                if stmt.strip():
                    conn.execute(stmt)
            row = conn.execute("SELECT value FROM meta WHERE key='schema'").fetchone()
            if row is None:
                conn.execute("INSERT INTO meta VALUES ('schema', ?)", (str(SCHEMA),))
            elif row[0] != str(SCHEMA):
                raise BadInput(f"cache {self.path}: schema {row[0]} is not {SCHEMA}; "
                               "use another --cache path or remove this file")
            conn.execute("COMMIT")
        except BaseException:
            conn.execute("ROLLBACK")
            raise

    def close(self) -> None:
        if self._conn is not None and self._pid == os.getpid():
            self._conn.close()
        self._conn = None

    # -- reading ------------------------------------------------------------
    def entries(self, key: tuple[int, int] | None = None, all_versions: bool = False) -> list[EntryInfo]:
        """Rows (without data), optionally for one character, newest software only by default."""
        sql = f"SELECT {_COLS} FROM spectra"
        cond, args = [], []
        if key is not None:
            cond.append("conductor = ? AND label = ?")
            args += [int(key[0]), int(key[1])]
        if not all_versions:
            cond.append("version = ?")
            args.append(self.version)
        if cond:
            sql += " WHERE " + " AND ".join(cond)
        sql += " ORDER BY conductor, label, height DESC, width ASC"
        return [EntryInfo(*row) for row in self.connection().execute(sql, args)]

    def read(self, entry_id: int) -> tuple[bytes, str]:
        row = self.connection().execute("SELECT data, digest FROM spectra WHERE id = ?",
                                        (int(entry_id),)).fetchone()
        if row is None:
            raise KeyError(entry_id)
        return bytes(row[0]), row[1]

    def _skip(self, entry_id: int, why: str) -> None:
        self.damaged.append(int(entry_id))
        warnings.warn(f"cache {self.path}: entry {entry_id} skipped and recomputed: {why}",
                      CacheWarning, stacklevel=3)

    def load_entry(self, entry_id: int) -> PrimitiveSpectrum | None:
        """The re-derived spectrum of one row, or None (noted in ``damaged``, with a warning).

        The checksum guards against accidents; :func:`certify.batch.recheck.recheck_spectrum`
        against wrong values: power sums and L(1/2) are recomputed and the zeros re-checked.
        """
        if int(entry_id) in self.damaged:
            return None
        try:
            blob, digest = self.read(entry_id)
            memo = self._rechecked.get((int(entry_id), digest))
            if memo is not None and memo[0] == blob:
                # these very bytes were re-derived by this process already: a fresh copy of
                # the re-derived spectrum (races may extend what they are given)
                self.loads += 1
                return _fresh_copy(memo[1])
            sp = decode(blob, digest)
            sp, seconds = recheck_spectrum(sp, self._batched_rederivation(sp))
            self._rechecked[(int(entry_id), digest)] = (blob, _fresh_copy(sp))
        except KeyError:
            self.damaged.append(int(entry_id))
            return None
        except (BadInput, ArithmeticError, ValueError) as exc:
            self._skip(entry_id, str(exc))
            return None
        self.rechecked += 1
        self.recheck_seconds += seconds
        self.loads += 1
        return sp

    def _batched_rederivation(self, sp):
        """(S_1..S_K, L(1/2)) of ``sp``'s character re-derived afresh, or None.

        The first time a conductor is met, the power sums and central values of every
        primitive character of that conductor with an entry in this cache are computed in
        one batch (:func:`certify.spectrum.moments.conductor_power_sums`: one Hurwitz jet
        per class and a DFT), at the largest count and accuracy those entries ask for, and
        kept for the process.  Only the labels, counts and accuracies of the rows are read
        (to size the batch); nothing stored enters the values.  None (the one-character
        path) when the batch does not pay, does not cover the entry, or fails.
        """
        from ..spectrum.afe import JET_AFE_MIN_CONDUCTOR
        from ..spectrum.moments import conductor_power_sums, prefer_batch

        c = int(sp.conductor)
        if not (3 <= c < JET_AFE_MIN_CONDUCTOR) or not sp.power_sums:
            return None
        memo = self._batched.get(c)
        if memo is None:
            memo = (0, 0, {})
            t0 = time.perf_counter()
            try:
                rows = self.connection().execute(
                    "SELECT label, moments, moment_bits FROM spectra WHERE conductor = ? "
                    "AND version = ?", (c, self.version)).fetchall()
                # sizes bounded as recheck_spectrum bounds them; other rows go one at a time
                rows = [(int(n), int(k), int(b)) for n, k, b in rows
                        if 1 <= int(n) < c and math.gcd(int(n), c) == 1
                        and 1 <= int(k) <= 200 and 0 <= int(b) <= 20000]
                from flint import dirichlet_char

                rows = [r for r in rows if dirichlet_char(c, r[0]).is_primitive()]
                labels = sorted({n for n, _, _ in rows})
                if prefer_batch(c, len(labels)):
                    K = max(k for _, k, _ in rows)
                    B = max(b for _, _, b in rows)
                    memo = (K, B, conductor_power_sums(c, labels, K, B))
            except (CertifyError, ArithmeticError, ValueError, KeyError, sqlite3.Error):
                memo = (0, 0, {})
            self._batched[c] = memo
            self.recheck_seconds += time.perf_counter() - t0
        K, B, data = memo
        if sp.label not in data or len(sp.power_sums) > K or int(sp.power_sum_bits) > B:
            return None
        return data[sp.label]

    def best_entry(self, key, height: float = 0.0, width: float = float("inf"),
                   moments: int = 0, bits: int = 0, fraction: float = 1.0) -> EntryInfo | None:
        """The entry that satisfies the request with least to spare, else the tallest."""
        rows = [e for e in self.entries(key) if e.id not in self.damaged]
        ok = [e for e in rows if e.satisfies(height, width, moments, bits, fraction)]
        if ok:
            return min(ok, key=lambda e: (e.height, -e.width, e.id))
        return max(rows, key=lambda e: (e.height, -e.width, e.moments, e.id)) if rows else None

    def load(self, key, height: float = 0.0, width: float = float("inf"), moments: int = 0,
             bits: int = 0, fraction: float = 1.0) -> PrimitiveSpectrum | None:
        """The stored spectrum for ``key`` (conductor, label) best matching a request, or None.

        With no request, the tallest entry.  Damaged entries are skipped.
        """
        for _ in range(64):
            e = self.best_entry(key, height, width, moments, bits, fraction)
            if e is None:
                return None
            sp = self.load_entry(e.id)
            if sp is not None:
                return sp
            # damaged: best_entry skips it from now on; look again among the rest
        return None

    def load_blob(self, key, height, width, moments, bits, fraction=0.25) -> tuple[bytes, str] | None:
        """(blob, digest) of a re-derived entry satisfying the request; None if none.

        The entry is decoded and re-derived (:meth:`load_entry`) and encoded
        again, so what is shipped to a worker holds the re-derived power sums
        and L(1/2), never the stored ones.
        """
        for e in self.entries(key):
            if e.satisfies(height, width, moments, bits, fraction) and e.id not in self.damaged:
                sp = self.load_entry(e.id)
                if sp is not None:
                    return encode(sp)
        return None

    def usable_start(self, key) -> tuple[bytes, str] | None:
        """(blob, digest) of the best re-derived entry for ``key`` to extend, or None."""
        for _ in range(64):
            e = self.best_entry(key)
            if e is None:
                return None
            sp = self.load_entry(e.id)
            if sp is not None:
                return encode(sp)
        return None

    # -- writing ------------------------------------------------------------
    def save(self, sp: PrimitiveSpectrum, seconds: float = 0.0) -> int | None:
        """Store ``sp`` in one transaction; drop entries it makes redundant.

        Returns the new row id, or None when an existing entry already holds
        at least as much (nothing written).
        """
        blob, digest = encode(sp)
        return self.save_blob(sp, blob, digest, seconds)

    def save_merged(self, sp: PrimitiveSpectrum, blob: bytes | None = None,
                    digest: str | None = None) -> int | None:
        """Store ``sp``, merged with the stored entry it does not cover when possible.

        Keeps one entry per character where the data allow (see :func:`merged`).
        """
        if blob is None:
            blob, digest = encode(sp)
        for e in self.entries(sp.key):
            if e.id in self.damaged:
                continue
            other = self.load_entry(e.id)
            if other is None:
                continue
            m = merged(sp, other)
            if m is not None and m is not sp:
                sp = m
                blob, digest = encode(sp)
        return self.save_blob(sp, blob, digest)

    def save_blob(self, sp: PrimitiveSpectrum, blob: bytes, digest: str,
                  seconds: float = 0.0) -> int | None:
        """Store one entry; a write that fails (full disk, read-only file) warns and stores nothing.

        The computation goes on without the cache: the entry is simply computed
        again next time.
        """
        try:
            return self._save_blob(sp, blob, digest, seconds)
        except sqlite3.Error as exc:
            warnings.warn(f"cache {self.path}: could not store the spectrum of "
                          f"chi_{{{sp.conductor},{sp.label}}} ({exc}); going on without caching it",
                          CacheWarning, stacklevel=2)
            return None

    def _save_blob(self, sp: PrimitiveSpectrum, blob: bytes, digest: str,
                   seconds: float = 0.0) -> int | None:
        conn = self.connection()
        h, w = float(sp.height), float(sp.zeros.width)
        k, b, f = len(sp.power_sums), int(sp.power_sum_bits), float(sp.zeros.grid_fraction)
        bad = [int(i) for i in self.damaged]
        conn.execute("BEGIN IMMEDIATE")
        try:
            for eid in bad:  # entries that failed their checks are replaced, not kept beside
                conn.execute("DELETE FROM spectra WHERE id = ? AND conductor = ? AND label = ?",
                             (eid, sp.conductor, sp.label))
            cover = conn.execute(
                "SELECT id FROM spectra WHERE conductor=? AND label=? AND version=? AND height>=? "
                "AND width<=? AND moments>=? AND moment_bits>=? AND grid_fraction<=? LIMIT 1",
                (sp.conductor, sp.label, self.version, h, w, k, b, f)).fetchone()
            if cover is not None:
                conn.execute("COMMIT")
                return None
            conn.execute(
                "DELETE FROM spectra WHERE conductor=? AND label=? AND version=? AND height<=? "
                "AND width>=? AND moments<=? AND moment_bits<=? AND grid_fraction>=?",
                (sp.conductor, sp.label, self.version, h, w, k, b, f))
            cur = conn.execute(
                "INSERT INTO spectra (conductor, label, parity, version, height, width, moments, "
                "moment_bits, grid_fraction, zeros, z_calls, seconds, flint, created, digest, data) "
                "VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?,?,?,?)",
                (sp.conductor, sp.label, sp.parity, self.version, h, w, k, b, f,
                 len(sp.zeros.zeros), int(sp.zeros.z_calls), float(seconds), flint_version,
                 time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()), digest, sqlite3.Binary(blob)))
            conn.execute("COMMIT")
        except BaseException:
            try:
                conn.execute("ROLLBACK")
            except sqlite3.Error:
                pass
            raise
        self.saves += 1
        return cur.lastrowid

    # -- maintenance --------------------------------------------------------
    def check(self) -> dict:
        """Integrity of the file and of every entry: {'integrity': str, 'damaged': [ids], 'entries': n}.

        Each entry is checked against its digest and re-derived
        (:func:`certify.batch.recheck.recheck_spectrum`).
        """
        conn = self.connection()
        integrity = conn.execute("PRAGMA integrity_check").fetchone()[0]
        bad = []
        n = 0
        for (eid,) in conn.execute("SELECT id FROM spectra").fetchall():
            n += 1
            try:
                blob, digest = self.read(eid)
                _, seconds = recheck_spectrum(decode(blob, digest))
                self.recheck_seconds += seconds
                self.rechecked += 1
            except (KeyError, BadInput, ArithmeticError, ValueError):
                bad.append(eid)
        return {"integrity": integrity, "damaged": bad, "entries": n,
                "recheck_seconds": self.recheck_seconds}

    def prune(self, other_versions: bool = False, damaged: bool = False,
              conductor_above: int | None = None, everything: bool = False) -> int:
        """Delete entries; returns how many.  Redundant entries never survive a save."""
        conn = self.connection()
        ids = set()
        if damaged:
            ids |= set(self.check()["damaged"])
        conn.execute("BEGIN IMMEDIATE")
        try:
            n = 0
            if everything:
                n += conn.execute("DELETE FROM spectra").rowcount
            else:
                if other_versions:
                    n += conn.execute("DELETE FROM spectra WHERE version != ?",
                                      (self.version,)).rowcount
                if conductor_above is not None:
                    n += conn.execute("DELETE FROM spectra WHERE conductor > ?",
                                      (int(conductor_above),)).rowcount
                for eid in ids:
                    n += conn.execute("DELETE FROM spectra WHERE id = ?", (eid,)).rowcount
            conn.execute("COMMIT")
        except BaseException:
            conn.execute("ROLLBACK")
            raise
        conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        if n:
            conn.execute("VACUUM")
        return n


def merged(a: PrimitiveSpectrum, b: PrimitiveSpectrum) -> PrimitiveSpectrum | None:
    """One spectrum holding the best of two of the same character, or None if neither part dominates.

    Zeros and power sums are independent certified data, so the zeros of one
    (taller and at least as fine, on a grid at least as fine) may go with the
    power sums of the other (more of them, at least as accurate).  Two races
    that extended the same stored spectrum in different directions (one
    taller, one with more moments) are thus stored as one entry that serves
    both.
    """
    if a.key != b.key:
        return None
    za, zb = a.zeros, b.zeros

    def covers(x, y):
        return x.height >= y.height and x.width <= y.width and x.grid_fraction <= y.grid_fraction

    zeros = za if covers(za, zb) else zb if covers(zb, za) else None
    if len(a.power_sums) >= len(b.power_sums) and a.power_sum_bits >= b.power_sum_bits:
        sums = a
    elif len(b.power_sums) >= len(a.power_sums) and b.power_sum_bits >= a.power_sum_bits:
        sums = b
    else:
        sums = None
    if zeros is None or sums is None:
        return None
    return PrimitiveSpectrum(a.conductor, a.label, a.parity, zeros, sums.power_sums,
                             sums.power_sum_bits, a.central)


def truncated(sp: PrimitiveSpectrum, height: float) -> PrimitiveSpectrum:
    """The same spectrum seen only up to ``height`` (zeros whose midpoint is <= height).

    The view's height is lowered below ``height`` if a left-out zero's ball
    reaches below it, so "every zero below the height is listed" stays true.
    Power sums and L(1/2) are unchanged (they are exact for all zeros).
    Gives each race the zeros its own plan asked for, whatever taller
    spectrum happens to be stored, so a race's enclosure does not depend on
    which other races ran before it.
    """
    if sp.height <= height:
        return sp
    zl = sp.zeros
    keep = [i for i, z in enumerate(zl.zeros) if float(z.mid()) <= height]
    kept = set(keep)
    top = float(height)
    left_out = [z for i, z in enumerate(zl.zeros) if i not in kept]
    if left_out:
        lowest = min(float(z.lower()) for z in left_out)
        if lowest < top:
            top = math.nextafter(lowest, 0.0)
    brackets = [zl.brackets[i] for i in keep] if len(zl.brackets) == len(zl.zeros) else list(zl.brackets)
    view = ZeroList(zl.conductor, zl.label, top, [zl.zeros[i] for i in keep], brackets,
                    zl.width, zl.z_calls, zl.grid_fraction)
    return PrimitiveSpectrum(sp.conductor, sp.label, sp.parity, view, sp.power_sums,
                             sp.power_sum_bits, sp.central)


class CachedStore(SpectrumStore):
    """A :class:`SpectrumStore` that reads a persistent cache and hands out views.

    * Before computing, it looks in ``backend`` (a :class:`SpectrumCache`) for an
      entry that satisfies the request; whatever it computes is saved there.
    * It returns the stored spectrum truncated to the requested height
      (:func:`truncated`), so a race sees the zeros it planned for.
    * ``computed`` lists the characters whose zeros or moments had to be computed.
    """

    def __init__(self, backend=None, spectra=None):
        super().__init__(spectra=dict(spectra or {}), backend=backend)
        self.computed: list[tuple[int, int]] = []
        self.hits = 0

    def get(self, conductor, label, parity, height, width, moments, moment_bits, *extra, **kw):
        key = (conductor, label)
        fraction = extra[0] if extra else kw.get("fraction", 0.25)
        sp = self.spectra.get(key)
        if not spectrum_satisfies(sp, height, width, moments, moment_bits, fraction) \
                and isinstance(self.backend, SpectrumCache):
            cand = self.backend.load(key, height, width, moments, moment_bits, fraction)
            if cand is not None and (sp is None or cand.height >= sp.height):
                self.spectra[key] = sp = cand
        if spectrum_satisfies(sp, height, width, moments, moment_bits, fraction):
            self.hits += 1
            return truncated(sp, height)
        if sp is not None:
            # extend to a spectrum that covers the old one in every respect (never a
            # coarser width), so the stored extension replaces it instead of sitting
            # beside it and the next race asking either finds one entry holding both
            width = min(width, sp.zeros.width)
            moments = max(moments, len(sp.power_sums))
            moment_bits = max(moment_bits, sp.power_sum_bits)
        full = super().get(conductor, label, parity, height, width, moments, moment_bits,
                           *extra, **kw)
        self.computed.append(key)
        return truncated(full, height)
