"""Cached spectra are data, not proof: a forged entry with a valid checksum is re-derived or refused.

The forgery: one stored power sum changed (or a zero moved) and the entry's
SHA-256 recomputed, so the checksum alone accepts it.  Before the change to
re-derivation, such an entry made ``certify table`` print disjoint
"certified" enclosures; now it is skipped with a warning naming the cache
file and recomputed, and the enclosure contains the published value.
"""

import json
import sqlite3
import zlib
import hashlib
import warnings
from fractions import Fraction

import pytest

from certify.arith import arb
from certify.batch.cache import CacheWarning, CachedStore, SpectrumCache
from certify.batch.recheck import RecheckFailed, recheck_spectrum
from certify.batch.serial import decode
from certify.cli import main
from certify.race.question import two_way
from certify.races import certify_race
from certify.spectrum.spectrum import SpectrumStore

# delta(4;3,1) = 0.9959... ("Chebyshev's bias", Experimental Mathematics 3 (1994), 4 digits)
PUBLISHED = (Fraction("0.99585"), Fraction("0.99595"))


def _meets(enc, lo, hi):
    return enc.lower <= hi and enc.upper >= lo


def _forge(path, conductor, edit):
    """Apply ``edit`` to the JSON of every entry of ``conductor`` and recompute its digest."""
    con = sqlite3.connect(path)
    rows = con.execute("SELECT id, data FROM spectra WHERE conductor=?", (conductor,)).fetchall()
    assert rows
    for eid, data in rows:
        d = json.loads(zlib.decompress(bytes(data)))
        edit(d)
        blob = zlib.compress(json.dumps(d, separators=(",", ":"), sort_keys=True).encode(), 6)
        con.execute("UPDATE spectra SET data=?, digest=? WHERE id=?",
                    (blob, hashlib.sha256(blob).hexdigest(), eid))
    con.commit()
    con.close()


def _shift_power_sum(d):
    mid, rad = d["power_sums"][0]
    d["power_sums"][0] = [str(float(mid) * 1.01), rad]


def _move_zero(d):
    mid, rad = d["zeros"]["balls"][2]
    d["zeros"]["balls"][2] = [str(float(mid) + 0.05), rad]


def _shift_central(d):
    (mid, rad), im = d["central"]
    d["central"] = [[str(float(mid) + 0.1), rad], im]


@pytest.fixture(scope="module")
def clean_4():
    st = SpectrumStore()
    r = certify_race(two_way(4, 3, 1), 6, store=st)
    assert _meets(r.density, *PUBLISHED) and r.density.upper - r.density.lower < 1e-6
    return st.spectra[(4, 3)], r


@pytest.mark.parametrize("edit", [_shift_power_sum, _move_zero, _shift_central],
                         ids=["power-sum", "zero", "central-value"])
def test_recheck_refuses_a_forged_spectrum(tmp_path, clean_4, edit):
    sp, _ = clean_4
    path = str(tmp_path / "c.sqlite")
    cache = SpectrumCache(path)
    cache.save(sp)
    cache.close()
    _forge(path, 4, edit)
    cache = SpectrumCache(path)
    blob, digest = cache.read(cache.entries((4, 3))[0].id)
    forged = decode(blob, digest)  # the checksum accepts it ...
    with pytest.raises(RecheckFailed):  # ... the re-derivation does not
        recheck_spectrum(forged)
    with pytest.warns(CacheWarning, match=path.replace(".", r"\.")):
        assert cache.load((4, 3)) is None
    cache.close()


def test_recheck_of_a_clean_spectrum_keeps_it_and_is_cheap(clean_4):
    sp, _ = clean_4
    again, seconds = recheck_spectrum(sp)
    assert len(again.power_sums) == len(sp.power_sums)
    for a, b in zip(again.power_sums, sp.power_sums):
        assert a.overlaps(b) and float(arb(a.rad())) <= float(arb(b.rad())) * 2 + 1e-300
    assert again.zeros.zeros == sp.zeros.zeros
    assert seconds < 5  # measured 0.014 s idle; only a guard against a runaway


def test_forged_power_sum_never_gives_a_disjoint_enclosure(tmp_path, clean_4, capsys):
    """The audit's scenario end to end: forged S_1 with a valid digest, then the driver and the table."""
    sp, clean = clean_4
    path = str(tmp_path / "c.sqlite")
    c = SpectrumCache(path)
    c.save(sp)
    c.close()
    _forge(path, 4, _shift_power_sum)
    # the driver's store over the cache: skipped with a warning, recomputed, enclosure sound
    with pytest.warns(CacheWarning, match="power sum"):
        r = certify_race(two_way(4, 3, 1), 6, store=CachedStore(backend=SpectrumCache(path)))
    assert _meets(r.density, *PUBLISHED) and _meets(r.density, clean.density.lower, clean.density.upper)
    # the table (coordinator path): exit 0, warning naming the file, enclosure sound
    _forge(path, 4, _shift_power_sum)  # the recomputed entry replaced the forged one: forge again
    out = tmp_path / "t"
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        rc = main(["table", "--race", "4:3,1", "--kinds", "two-way", "--digits", "6", "--cache", path,
                   "--out", str(out), "--workers", "1", "--quiet"])
    assert rc == 0
    assert any(issubclass(w.category, CacheWarning) and path in str(w.message) for w in caught)
    res = json.loads(next((out / "results").rglob("*.json")).read_text())
    assert res["question"]["label"] in ("delta(4;3,1)", "delta(4;1,3)")
    lo, hi = Fraction(res["density"]["lower"]), Fraction(res["density"]["upper"])
    if res["question"]["label"] == "delta(4;1,3)":  # the table lists a < b: delta(4;1,3) = 1 - delta(4;3,1)
        lo, hi = 1 - hi, 1 - lo
    assert lo <= PUBLISHED[1] and hi >= PUBLISHED[0] and lo <= clean.density.upper and hi >= clean.density.lower
    summary = json.loads((out / "batch.json").read_text())
    assert summary["spectra"]["recheck"]["skipped"] >= 1


def test_a_forged_spectrum_from_a_worker_is_refused_before_use(tmp_path, monkeypatch):
    """A worker is another process: its spectrum is data.  A worker that sends back a changed
    power sum (valid digest) has its spectrum refused by the coordinator (warning, not stored,
    not shipped); the race computes its own and its enclosure contains the published value.
    A clean worker's spectra are re-checked too, and the cost is reported."""
    import certify.batch.run as run_mod
    from certify.batch.run import WorkerSpectrumWarning
    from certify.batch.serial import encode

    real = run_mod.conductor_task

    def forging(pairs):
        out = real(pairs)
        for res in out:
            sp = decode(res["blob"], res["digest"])
            d_sums = list(sp.power_sums)
            d_sums[0] = d_sums[0] * 1.01
            forged = type(sp)(sp.conductor, sp.label, sp.parity, sp.zeros, d_sums,
                              sp.power_sum_bits, sp.central)
            res["blob"], res["digest"] = encode(forged)
        return out

    monkeypatch.setattr(run_mod, "conductor_task", forging)
    out = tmp_path / "t"
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        rc = main(["table", "--race", "4:3,1", "--kinds", "two-way", "--digits", "6", "--no-cache",
                   "--out", str(out), "--workers", "1", "--quiet"])
    assert rc == 0
    assert any(issubclass(w.category, WorkerSpectrumWarning) and "power sum" in str(w.message)
               for w in caught)
    summary = json.loads((out / "batch.json").read_text())
    assert summary["spectra"]["worker_recheck"]["refused"] == 1
    assert summary["spectra"]["worker_recheck"]["entries"] == 0
    con = sqlite3.connect(str(out / "spectra-scratch.sqlite"))
    stored = [json.loads(zlib.decompress(bytes(b)))["power_sums"][0]
              for (b,) in con.execute("SELECT data FROM spectra WHERE conductor = 4")]
    con.close()
    sp_clean = SpectrumStore().get(4, 3, 1, 0.0, 1e-3, 1, 80)
    for mid, rad in stored:  # whatever was stored later is not the forged value
        assert arb(mid, rad).overlaps(sp_clean.power_sums[0])
    res = json.loads(next((out / "results").rglob("*.json")).read_text())
    lo, hi = Fraction(res["density"]["lower"]), Fraction(res["density"]["upper"])
    if res["question"]["label"] == "delta(4;1,3)":
        lo, hi = 1 - hi, 1 - lo
    assert lo <= PUBLISHED[1] and hi >= PUBLISHED[0]
    # a clean worker: every spectrum it computed is re-checked, at a measured cost
    monkeypatch.setattr(run_mod, "conductor_task", real)
    out2 = tmp_path / "t2"
    assert main(["table", "--moduli", "5", "--digits", "5", "--no-cache", "--out", str(out2),
                 "--workers", "1", "--quiet"]) == 0
    wr = json.loads((out2 / "batch.json").read_text())["spectra"]["worker_recheck"]
    assert wr["entries"] == json.loads((out2 / "batch.json").read_text())["spectra"]["computed"] >= 2
    assert wr["refused"] == 0 and 0 <= wr["seconds"] < 30


def test_batched_rederivation_of_a_conductor_refuses_a_forged_entry(tmp_path):
    """The characters of one conductor are re-derived together (one batch per process): a
    forged power sum (valid digest) among them is still refused, the others are loaded with
    power sums that overlap those computed afresh one character at a time."""
    from certify.spectrum.moments import zero_power_sums

    st = SpectrumStore()
    certify_race(two_way(7, 3, 1), 4, store=st)
    keys = sorted(k for k in st.spectra if k[0] == 7)
    assert len(keys) >= 4  # enough characters for the batched path
    path = str(tmp_path / "c.sqlite")
    c = SpectrumCache(path)
    for k in keys:
        c.save(st.spectra[k])
    c.close()
    con = sqlite3.connect(path)
    eid, data = con.execute("SELECT id, data FROM spectra WHERE conductor=7 AND label=?",
                            (keys[0][1],)).fetchone()
    d = json.loads(zlib.decompress(bytes(data)))
    _shift_power_sum(d)
    blob = zlib.compress(json.dumps(d, separators=(",", ":"), sort_keys=True).encode(), 6)
    con.execute("UPDATE spectra SET data=?, digest=? WHERE id=?",
                (blob, hashlib.sha256(blob).hexdigest(), eid))
    con.commit()
    con.close()
    cache = SpectrumCache(path)
    with pytest.warns(CacheWarning, match="power sum"):
        assert cache.load(keys[0]) is None
    assert keys[0][1] in cache._batched[7][2]  # refused by the batched re-derivation
    for k in keys[1:]:
        sp = cache.load(k)
        assert sp is not None
        alone = zero_power_sums(7, k[1], sp.parity, len(sp.power_sums), sp.power_sum_bits)
        for a, b in zip(sp.power_sums, alone):
            assert a.overlaps(b) and float(arb(a.rad())) < 2.0 ** -sp.power_sum_bits
    cache.close()
