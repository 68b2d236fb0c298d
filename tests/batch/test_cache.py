"""The spectra cache: exact round trips, transactions, damaged entries, concurrent writers, views."""

import multiprocessing as mp
import os
import sqlite3
from fractions import Fraction

import mpmath
import pytest

from certify.arith import arb
from certify.batch.cache import CacheWarning, CachedStore, SpectrumCache, default_cache_path, truncated
from certify.batch.serial import decode, encode
from certify.errors import BadInput
from certify.race.question import two_way
from certify.races import certify_race
from certify.spectrum.spectrum import SpectrumStore


@pytest.fixture(scope="module")
def spectrum_4():
    """chi_{4,3} (the character of Q(i)) to height 40, zeros to width 1e-12, 12 power sums."""
    return SpectrumStore().get(4, 3, 1, 40.0, 1e-12, 12, 200)


@pytest.fixture(scope="module")
def spectrum_5():
    return SpectrumStore().get(5, 2, 1, 25.0, 1e-12, 8, 150)


def _same_or_wider(x, y):
    """y contains x, with the same midpoint and a radius at most one part in 1e6 larger."""
    return (y.contains(x) and x.mid() == y.mid()
            and float(arb(y.rad())) <= float(arb(x.rad())) * (1 + 1e-6) + 1e-300)


def test_round_trip_is_exact_up_to_radius_rounding(spectrum_4):
    blob, digest = encode(spectrum_4)
    back = decode(blob, digest)
    assert back.key == spectrum_4.key and back.parity == spectrum_4.parity
    assert back.height == spectrum_4.height and back.zeros.width == spectrum_4.zeros.width
    assert back.zeros.brackets == spectrum_4.zeros.brackets
    assert len(back.zeros.zeros) == len(spectrum_4.zeros.zeros) > 5
    for x, y in zip(spectrum_4.zeros.zeros, back.zeros.zeros):
        assert _same_or_wider(x, y)
    for x, y in zip(spectrum_4.power_sums, back.power_sums):
        assert _same_or_wider(x, y)
    assert _same_or_wider(spectrum_4.central.real, back.central.real)
    # independent values through the cache: the first ordinate of L(s, chi_{-4}), from memory
    # of the published zero tables (Math. Comp. 23 (1969)), given to 10 decimals ...
    z1 = back.zeros.zeros[0]
    assert z1.overlaps(arb("6.0209489047", "6e-11"))
    assert float(arb(z1.rad())) < 1e-12
    # ... and L(1/2, chi_{-4}) from mpmath's Dirichlet series (an independent evaluation path)
    with mpmath.workdps(30):
        beta_half = mpmath.dirichlet(mpmath.mpf(1) / 2, [0, 1, 0, -1])
        ref = arb(mpmath.nstr(beta_half, 28), "1e-26")
    assert back.central.real.overlaps(ref)
    assert float(arb(back.central.real.rad())) < 1e-10
    assert back.central.imag.contains(arb(0))


def test_damaged_blob_is_refused(spectrum_4):
    blob, digest = encode(spectrum_4)
    bad = bytearray(blob)
    bad[len(bad) // 2] ^= 0x01
    with pytest.raises(BadInput):
        decode(bytes(bad), digest)
    with pytest.raises(BadInput):
        decode(b"not a blob")


def test_save_load_dominance_and_versions(tmp_path, spectrum_4):
    path = str(tmp_path / "c.sqlite")
    cache = SpectrumCache(path)
    low = truncated(spectrum_4, 20.0)
    assert cache.save(low) is not None
    assert cache.save(low) is None  # already held: nothing written
    assert cache.save(spectrum_4) is not None  # taller: replaces the lower one
    rows = cache.entries()
    assert len(rows) == 1 and rows[0].height == spectrum_4.height
    back = cache.load((4, 3), 30.0, 1e-11, 10, 100)
    assert back is not None and back.height == spectrum_4.height
    assert cache.load((4, 3), 100.0, 1e-11, 10, 100).height == spectrum_4.height  # best there is
    assert cache.load((5, 2)) is None
    other = SpectrumCache(path, version="certify 0.0.0-other")
    assert other.load((4, 3)) is None  # another version's entries are never used
    other.save(spectrum_4)
    assert len(cache.entries(all_versions=True)) == 2
    assert cache.prune(other_versions=True) == 1
    assert len(cache.entries(all_versions=True)) == 1
    cache.close()
    other.close()


def test_damaged_entry_detected_skipped_and_pruned(tmp_path, spectrum_4, spectrum_5):
    path = str(tmp_path / "c.sqlite")
    cache = SpectrumCache(path)
    cache.save(spectrum_4)
    cache.save(spectrum_5)
    con = sqlite3.connect(path)
    blob = bytearray(con.execute("SELECT data FROM spectra WHERE conductor=5").fetchone()[0])
    blob[10] ^= 0xFF
    con.execute("UPDATE spectra SET data=? WHERE conductor=5", (bytes(blob),))
    con.commit()
    con.close()
    fresh = SpectrumCache(path)
    with pytest.warns(CacheWarning, match="checksum"):
        assert fresh.load((5, 2)) is None
    assert fresh.load((4, 3)) is not None
    rep = fresh.check()
    assert rep["integrity"] == "ok" and len(rep["damaged"]) == 1 and rep["entries"] == 2
    assert fresh.prune(damaged=True) == 1
    assert fresh.check()["damaged"] == []
    fresh.close()
    cache.close()


def test_default_location(monkeypatch, tmp_path):
    monkeypatch.setenv("CERTIFY_CACHE", str(tmp_path / "x.sqlite"))
    assert default_cache_path() == str(tmp_path / "x.sqlite")
    monkeypatch.delenv("CERTIFY_CACHE")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert default_cache_path() == os.path.join(str(tmp_path), "certify", "spectra.sqlite")


def test_not_a_database_is_bad_input(tmp_path):
    p = tmp_path / "junk.sqlite"
    p.write_bytes(b"this is not sqlite" * 100)
    with pytest.raises(BadInput):
        SpectrumCache(str(p)).entries()


def _writer(path, blob, digest, rounds, version):
    cache = SpectrumCache(path, version=version)
    sp = decode(blob, digest)
    for _ in range(rounds):
        cache.save_blob(sp, blob, digest)
        cache.entries()
    cache.close()


def test_concurrent_writers_leave_a_sound_file(tmp_path, spectrum_4, spectrum_5):
    path = str(tmp_path / "c.sqlite")
    SpectrumCache(path).connection()
    ctx = mp.get_context("spawn")
    procs = []
    for i, sp in enumerate([spectrum_4, spectrum_5, spectrum_4, spectrum_5]):
        blob, digest = encode(sp)
        procs.append(ctx.Process(target=_writer, args=(path, blob, digest, 15, f"v{i % 3}")))
    for p in procs:
        p.start()
    for p in procs:
        p.join(60)
        assert p.exitcode == 0
    cache = SpectrumCache(path, version="v0")
    rep = cache.check()
    assert rep["integrity"] == "ok" and rep["damaged"] == []
    # one entry per (character, version): duplicates are never written
    rows = cache.entries(all_versions=True)
    assert sorted((e.conductor, e.version) for e in rows) == sorted(
        {(4, "v0"), (5, "v1"), (4, "v2"), (5, "v0")})
    cache.close()


def test_view_keeps_zeros_below_height(spectrum_4):
    v = truncated(spectrum_4, 20.0)
    assert v.height <= 20.0
    assert all(float(z.mid()) <= 20.0 for z in v.zeros.zeros)
    below = [z for z in spectrum_4.zeros.zeros if float(z.upper()) < 20.0]
    assert len(v.zeros.zeros) == len([z for z in spectrum_4.zeros.zeros if float(z.mid()) <= 20.0])
    assert len(v.zeros.zeros) >= len(below) > 0
    assert v.power_sums is spectrum_4.power_sums
    assert truncated(spectrum_4, 1000.0) is spectrum_4


def test_cached_store_reuses_a_taller_spectrum(tmp_path):
    """A race served from a cache holding taller spectra than it asks for is still certified.

    Check value: delta(4;3,1) ~ 0.9959 ("Chebyshev's bias", Chebyshev's bias,
    Experimental Mathematics 3 (1994)); only the printed digits are asserted.
    """
    cache = SpectrumCache(str(tmp_path / "c.sqlite"))
    cache.save(SpectrumStore().get(4, 3, 1, 120.0, 1e-14, 20, 400))
    store = CachedStore(backend=cache)
    r = certify_race(two_way(4, 3, 1), 6, store=store)
    assert store.computed == [] and store.hits >= 1
    assert r.target_met and r.density.width <= Fraction(1, 10**6)
    assert r.density.digits().startswith("0.9959")
    assert max(g.height for g in r.groups) < 120.0
    cache.close()


def test_extensions_in_two_directions_are_merged(tmp_path):
    """A taller spectrum and one with more moments become one entry serving both."""
    from certify.batch.cache import merged

    tall = SpectrumStore().get(5, 2, 1, 30.0, 1e-12, 6, 120)
    rich = SpectrumStore().get(5, 2, 1, 10.0, 1e-12, 12, 200)
    m = merged(tall, rich)
    assert m.height == tall.height and m.zeros is tall.zeros
    assert m.power_sums is rich.power_sums and m.power_sum_bits == 200
    assert merged(tall, SpectrumStore().get(5, 3, 1, 10.0, 1e-12, 12, 200)) is None
    finer = SpectrumStore().get(5, 2, 1, 10.0, 1e-14, 6, 120)
    assert merged(tall, finer) is None  # neither zero list covers the other
    cache = SpectrumCache(str(tmp_path / "c.sqlite"))
    cache.save_merged(tall)
    cache.save_merged(rich)
    rows = cache.entries()
    assert len(rows) == 1 and rows[0].height == 30.0 and rows[0].moments == 12
    assert rows[0].moment_bits == 200
    cache.close()
