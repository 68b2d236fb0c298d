"""The same batch on a local dask.distributed cluster (loopback) gives the same enclosures.

dask is an optional extra; this test is skipped only when it is missing and
CI is unset (CI must install ``dask[distributed]``).
"""

import json
import logging
import os

import pytest

from certify.batch.run import run_batch

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
MODULI = [3, 4, 5, 7, 8]
DIGITS = 6


def _distributed():
    try:
        import distributed  # noqa: F401
    except ImportError:
        if os.environ.get("CI"):
            pytest.fail("dask.distributed is not installed; CI must install dask[distributed]")
        pytest.skip("dask.distributed is not installed (optional extra)")
    return distributed


def _enclosures(out):
    got = {}
    for dirpath, _, files in os.walk(os.path.join(out, "results")):
        for f in files:
            if f.endswith(".json"):
                d = json.load(open(os.path.join(dirpath, f), encoding="utf-8"))
                got[f] = (d["density"]["lower"], d["density"]["upper"], d["density"]["target_met"])
    return got


def test_dask_cluster_matches_local_run(tmp_path, monkeypatch):
    distributed = _distributed()
    monkeypatch.setenv("PYTHONPATH", ROOT + os.pathsep + os.environ.get("PYTHONPATH", ""))
    local = run_batch(MODULI, DIGITS, str(tmp_path / "local"), workers=1,
                      cache_path=str(tmp_path / "local.sqlite"), progress=False)
    assert local["missing"] == 0 and local["failures"] == []
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                       host="127.0.0.1", dashboard_address=None,
                                       silence_logs=logging.ERROR)
    try:
        assert cluster.scheduler_address.startswith("tcp://127.0.0.1:")
        remote = run_batch(MODULI, DIGITS, str(tmp_path / "dask"), scheduler=cluster.scheduler_address,
                           cache_path=str(tmp_path / "dask.sqlite"), progress=False)
    finally:
        cluster.close()
    assert remote["executor"]["kind"] == "dask.distributed" and remote["executor"]["workers"] == 2
    assert remote["spectra"]["computed"] == local["spectra"]["computed"] > 0
    a, b = _enclosures(str(tmp_path / "local")), _enclosures(str(tmp_path / "dask"))
    assert len(a) == local["races"] and a == b
    # and the shared check value: delta(4;3,1) ~ 0.9959 ("Chebyshev's bias",
    # Chebyshev's bias, Experimental Mathematics 3 (1994)); the file holds delta(4;1,3) = 1 - it
    lo, hi, met = b["two-way_4_1_3.json"]
    assert met and str(1 - float(hi)).startswith("0.9959")


def test_unreachable_scheduler_is_a_clear_error(tmp_path):
    _distributed()
    from certify.errors import BadInput
    from certify.batch.execute import DaskExecutor

    with pytest.raises(BadInput):
        DaskExecutor("tcp://127.0.0.1:9", timeout=2)
