"""Running batch tasks: in this process, on local processes, or on dask.distributed.

Two kinds of task, both plain functions of picklable arguments so that any
executor can run them:

* :func:`spectrum_task` computes (or extends) one primitive spectrum and
  returns it encoded (:mod:`certify.batch.serial`) with the time spent on
  zeros, power sums and L(1/2);
* :func:`race_task` certifies a few races of one modulus from spectra shipped
  with the task, and returns each result's JSON dictionary.

Workers never write the cache: the coordinating process does, one
transaction per spectrum, so a worker killed at any moment loses only its
current task.  Spectra travel with the tasks, so a dask worker on another
machine needs no shared file system.

python-flint's working precision is process-wide, so tasks in one process
run one at a time (a lock), even on a dask worker started with several
threads; start workers with ``--nthreads 1`` and as many processes as cores.
"""

from __future__ import annotations

import collections
import os
import sys
import threading
import time

from ..errors import CertifyError
from ..io import compact_json
from .serial import decode, encode

_LOCK = threading.Lock()
_DECODED: "collections.OrderedDict[str, object]" = collections.OrderedDict()
_DECODED_MAX = 2000


RACE_MEMORY = int(os.environ.get("CERTIFY_RACE_MEMORY_MB", "3072")) << 20


class _MemoryCap:
    """Scoped cap on this process's address space: what it uses now plus ``extra`` bytes.

    A race that runs away (for instance by turning a non-finite ball into an
    exact rational) then raises MemoryError in its own task, reported as not
    certified, instead of exhausting the machine.  Restored on exit.
    """

    def __init__(self, extra: int):
        self.extra = extra
        self.old = None

    def __enter__(self):
        try:
            import resource

            with open("/proc/self/statm") as fh:
                vsize = int(fh.read().split()[0]) * os.sysconf("SC_PAGE_SIZE")
            self.old = resource.getrlimit(resource.RLIMIT_AS)
            soft, hard = self.old
            cap = vsize + self.extra
            if hard != resource.RLIM_INFINITY:
                cap = min(cap, hard)
            if soft == resource.RLIM_INFINITY or soft > cap:
                resource.setrlimit(resource.RLIMIT_AS, (cap, hard))
            else:
                self.old = None
        except (ImportError, OSError, ValueError):
            self.old = None
        return self

    def __exit__(self, *exc):
        if self.old is not None:
            import resource

            try:
                resource.setrlimit(resource.RLIMIT_AS, self.old)
            except (ValueError, OSError):
                pass
        return False


def _spectrum_of(blob: bytes, digest: str):
    sp = _DECODED.get(digest)
    if sp is None:
        sp = decode(blob, digest)
        _DECODED[digest] = sp
        if len(_DECODED) > _DECODED_MAX:
            _DECODED.popitem(last=False)
    return sp


# --- tasks -------------------------------------------------------------------

def conductor_task(pairs: list) -> list[dict]:
    """The spectra of several characters of one conductor: :func:`spectrum_task` for each
    (req, start) pair, after one batched pass for all of them (power sums and central
    values by Hurwitz jets and a DFT; Hardy Z on the common search grid), docs/method.md
    sections 2c and 3c.  The batched time is shared out equally in the timings."""
    from ..spectrum.moments import conductor_power_sums, hardy_grid, prefer_batch

    reqs = [r for r, _ in pairs]
    c = int(reqs[0]["conductor"])
    if not prefer_batch(c, len(pairs)):
        return [spectrum_task(req, start) for req, start in pairs]
    with _LOCK:
        t0 = time.perf_counter()
        K = max(int(r["moments"]) for r in reqs)
        B = max(int(r["bits"]) for r in reqs)
        labels = [int(r["label"]) for r in reqs]
        batched = {(c, n): (sums, B, cv)
                   for n, (sums, cv) in conductor_power_sums(c, labels, K, B).items()}
        t1 = time.perf_counter()
        hardy_grid(c, labels, max(float(r["height"]) for r in reqs),
                   min(float(r.get("fraction", 0.25)) for r in reqs))
        t2 = time.perf_counter()
        out = []
        for req, start in pairs:
            res = _spectrum(req, start, batched)
            res["timings"]["moments"] += (t1 - t0) / len(pairs)
            res["timings"]["zeros"] += (t2 - t1) / len(pairs)
            out.append(res)
        return out


def spectrum_task(req: dict, start: tuple | None = None, batched: dict | None = None) -> dict:
    """Compute the spectrum ``req`` asks for, extending ``start`` (blob, digest) if given.

    ``req`` has conductor, label, parity, height, width, moments, bits; ``batched`` may
    hold {(conductor, label): (power sums, bits, central value)} computed for a whole
    conductor (:func:`conductor_task`).
    Mirrors :meth:`certify.spectrum.spectrum.SpectrumStore.get`, timing each part.
    """
    with _LOCK:
        return _spectrum(req, start, batched)


def _spectrum(req: dict, start: tuple | None = None, batched: dict | None = None) -> dict:
    from ..spectrum.moments import central_value, zero_power_sums
    from ..spectrum.spectrum import PrimitiveSpectrum
    from ..spectrum.zeros import find_zeros

    c, n, par = int(req["conductor"]), int(req["label"]), int(req["parity"])
    h, w = float(req["height"]), float(req["width"])
    k, b = int(req["moments"]), int(req["bits"])
    fraction = float(req.get("fraction", 0.25))
    sp = decode(*start) if start is not None else None
    t = {"zeros": 0.0, "moments": 0.0, "central": 0.0}
    z_calls = 0
    t0 = time.perf_counter()
    if sp is None or sp.height < h or sp.zeros.width > w or sp.zeros.grid_fraction > fraction:
        base = sp.zeros if sp is not None and sp.zeros.grid_fraction <= fraction else None
        zl = find_zeros(c, n, max(h, sp.height if sp else 0.0), min(w, sp.zeros.width if sp else w),
                        fraction=fraction, start=base)
        z_calls = zl.z_calls - (base.z_calls if base else 0)
        sp = PrimitiveSpectrum(c, n, par, zl, sp.power_sums if sp else [],
                               sp.power_sum_bits if sp else 0, sp.central if sp else None)
    t1 = time.perf_counter()
    t["zeros"] = t1 - t0
    got = (batched or {}).get((c, n))
    if (len(sp.power_sums) < k or sp.power_sum_bits < b) and got is not None \
            and len(got[0]) >= max(k, len(sp.power_sums)) and got[1] >= max(b, sp.power_sum_bits):
        sp = PrimitiveSpectrum(c, n, par, sp.zeros, list(got[0]), got[1],
                               sp.central if sp.central is not None else got[2])
    if len(sp.power_sums) < k or sp.power_sum_bits < b:
        sums = zero_power_sums(c, n, par, max(k, len(sp.power_sums)), max(b, sp.power_sum_bits))
        sp = PrimitiveSpectrum(c, n, par, sp.zeros, sums, max(b, sp.power_sum_bits), sp.central)
    t2 = time.perf_counter()
    t["moments"] = t2 - t1
    if sp.central is None:
        sp = PrimitiveSpectrum(c, n, par, sp.zeros, sp.power_sums, sp.power_sum_bits,
                               central_value(c, n))
    t["central"] = time.perf_counter() - t2
    blob, digest = encode(sp)
    return {"key": [c, n], "blob": blob, "digest": digest, "timings": t, "z_calls": z_calls,
            "zeros": len(sp.zeros.zeros), "height": sp.height, "pid": os.getpid()}


def race_task(items: list, digits: int, spectra: dict, command_line: str = "",
              plans: list | None = None) -> list[dict]:
    """Certify each (slug, question) of ``items`` from the shipped ``spectra``.

    ``plans`` (optional, one per item, None where absent) are the plans the coordinator
    made for these races (:meth:`certify.races.RacePlan.to_wire`); a race with one does
    not plan again (:func:`certify.races.shipped_plan` recomputes its exact variance).

    ``spectra`` maps "conductor.label" to (blob, digest).  Each race sees them
    truncated to the heights it asks for.  A spectrum a race had to extend (a
    refinement round going past the plan) is kept for the following races of
    the task, so it is extended once per task, not once per race; the
    extensions come back encoded in the last entry's ``new_spectra`` for the
    coordinator to store.  The order of races in a task is fixed by the plan,
    so the enclosures do not depend on the executor.
    """
    from ..races import certify_race, shipped_plan
    from .cache import CachedStore

    with _LOCK:
        base = {}
        digests = {}
        for key, (blob, digest) in spectra.items():
            c, n = (int(x) for x in key.split("."))
            base[(c, n)] = _spectrum_of(blob, digest)
            digests[key] = digest
        out = []
        extended = {}
        for j, (slug, question) in enumerate(items):
            store = CachedStore(backend=None, spectra=base)
            t0 = time.perf_counter()
            wire = plans[j] if plans is not None and j < len(plans) else None
            try:
                with _MemoryCap(RACE_MEMORY):
                    plan = shipped_plan(question, digits, store, wire) if wire else None
                    r = certify_race(question, digits, store=store, command_line=command_line,
                                     plan=plan)
            except CertifyError as exc:
                out.append({"slug": slug, "ok": False, "error": str(exc),
                            "error_kind": type(exc).__name__, "new_spectra": [],
                            "seconds": time.perf_counter() - t0})
                continue
            except MemoryError:
                out.append({"slug": slug, "ok": False, "error_kind": "MemoryError",
                            "new_spectra": [],
                            "error": "not certified: the race engine ran out of memory",
                            "seconds": time.perf_counter() - t0})
                continue
            except Exception as exc:  # one race's failure must not end the batch
                out.append({"slug": slug, "ok": False, "error_kind": type(exc).__name__,
                            "new_spectra": [],
                            "error": f"not certified: engine error {type(exc).__name__}: {exc}",
                            "seconds": time.perf_counter() - t0})
                continue
            d = r.to_dict()
            # the row's certificate (verify re-checks it): built from this store's spectra
            cert_doc = None
            try:
                from ..certificate.build import certificate_document

                cert_doc = certificate_document(r, store)
            except CertifyError as exc:
                d["certificate_error"] = str(exc)
            used = sorted({f"{c}.{n}" for g in r.groups for (c, n) in g.primitive_keys})
            for key in dict.fromkeys(store.computed):
                base[key] = extended[key] = store.spectra[key]
            d["batch"] = {
                "slug": slug,
                "spectra": {k: digests.get(k, "computed in this task") for k in used},
                "spectra_extended_in_task": [f"{c}.{n}" for c, n in dict.fromkeys(store.computed)],
            }
            # serialised here, in the worker, with the C encoder (compact JSON): the
            # coordinator only writes the text, so it does not become the bottleneck
            out.append({"slug": slug, "ok": True, "result": d,
                        "result_text": compact_json(d),
                        "certificate_text": (compact_json(cert_doc) if cert_doc is not None
                                             else None),
                        # what the table index shows of the certificate (it need not re-read it)
                        "certificate_summary": (None if cert_doc is None else {
                            "answer": {"enclosure": dict(cert_doc["answer"]["enclosure"])},
                            "question": {"label": cert_doc["question"]["label"]}}),
                        "target_met": r.target_met,
                        "timings": dict(r.timings), "seconds": time.perf_counter() - t0,
                        "z_calls": store.z_calls, "new_spectra": []})
        if out:
            for key, sp in extended.items():
                blob, digest = encode(sp)
                out[-1]["new_spectra"].append({"key": list(key), "blob": blob, "digest": digest})
        return out


# --- executors ---------------------------------------------------------------

class InlineExecutor:
    """Runs tasks in this process, one after the other."""

    name = "inline"
    workers = 1

    def submit(self, fn, *args):
        class _Done:
            def __init__(self, value=None, error=None):
                self.value, self.error = value, error

        try:
            return _Done(fn(*args))
        except BaseException as exc:  # re-raised by result()
            return _Done(error=exc)

    @staticmethod
    def result(fut):
        if fut.error is not None:
            raise fut.error
        return fut.value

    def wait_one(self, pending):
        return [pending[0]]

    def close(self):
        pass


def die_with_parent(parent_pid: int | None = None) -> None:
    """Make this (worker) process end when its coordinating process ends.

    On Linux the kernel sends SIGKILL when the parent dies (``PR_SET_PDEATHSIG``);
    everywhere, a daemon thread also checks every second that the parent is still
    the one that started us and exits otherwise (a coordinator killed by SIGKILL
    cannot clean up its pool, so the workers must notice by themselves).
    """
    import signal

    parent = parent_pid if parent_pid is not None else os.getppid()
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        PR_SET_PDEATHSIG = 1
        libc.prctl(PR_SET_PDEATHSIG, signal.SIGKILL, 0, 0, 0)
    except (OSError, AttributeError):
        pass
    if os.getppid() != parent:  # the parent died before prctl took effect
        os._exit(1)

    def watch():
        while True:
            time.sleep(1.0)
            if os.getppid() != parent:
                os._exit(1)

    threading.Thread(target=watch, name="certify-parent-watch", daemon=True).start()


def _worker_init(limit: int, parent_pid: int) -> None:
    """Worker initializer: die with the coordinator, cap the address space."""
    die_with_parent(parent_pid)
    _limit_memory(limit)


def _limit_memory(limit: int) -> None:
    """Worker initializer: cap the address space, so a runaway race raises MemoryError
    in its own worker (reported as not certified) instead of calling the system's
    out-of-memory killer on the machine."""
    try:
        import resource

        soft, hard = resource.getrlimit(resource.RLIMIT_AS)
        if hard == resource.RLIM_INFINITY or hard > limit:
            resource.setrlimit(resource.RLIMIT_AS, (limit, hard))
    except (ImportError, ValueError, OSError):
        pass


def worker_memory_limit(workers: int) -> int:
    """Address-space cap per worker: a share of physical memory, at least 3 GiB."""
    try:
        phys = os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES")
    except (ValueError, OSError, AttributeError):
        phys = 8 << 30
    return max(3 << 30, phys // (workers + 1))


class ProcessExecutor:
    """Local worker processes (spawned, so no state is shared by fork).

    Each worker's address space is capped (:func:`worker_memory_limit`).  If a
    worker dies anyway, the pool is restarted and the tasks in flight are
    resubmitted (:func:`run_all`).
    """

    name = "local processes"

    def __init__(self, workers: int):
        import concurrent.futures as cf

        self.workers = workers
        self._cf = cf
        self.memory_limit = worker_memory_limit(workers)
        self._start()

    def _start(self):
        import multiprocessing as mp

        self.pool = self._cf.ProcessPoolExecutor(max_workers=self.workers,
                                                 mp_context=mp.get_context("spawn"),
                                                 initializer=_worker_init,
                                                 initargs=(self.memory_limit, os.getpid()))

    def is_broken(self, exc) -> bool:
        from concurrent.futures.process import BrokenProcessPool

        return isinstance(exc, BrokenProcessPool)

    def restart(self):
        self.pool.shutdown(wait=False, cancel_futures=True)
        self._start()

    def submit(self, fn, *args):
        return self.pool.submit(fn, *args)

    @staticmethod
    def result(fut):
        return fut.result()

    def wait_one(self, pending):
        done, _ = self._cf.wait(pending, return_when=self._cf.FIRST_COMPLETED)
        return list(done)

    def close(self):
        self.pool.shutdown(wait=True, cancel_futures=True)


class DaskExecutor:
    """Tasks on a dask.distributed cluster given by its scheduler address.

    dask is an optional extra (``pip install "dask[distributed]"``), imported
    only here.  The workers must be able to import certify (same version).
    """

    name = "dask.distributed"

    def __init__(self, address: str, timeout: float = 30.0):
        try:
            from dask.distributed import Client
        except ImportError:
            from ..errors import BadInput

            raise BadInput("--scheduler needs dask.distributed: pip install \"dask[distributed]\"") \
                from None
        from ..errors import BadInput

        try:
            self.client = Client(address, timeout=timeout, set_as_default=False)
        except (OSError, TimeoutError) as exc:
            raise BadInput(f"cannot reach the dask scheduler at {address}: {exc}") from None
        info = self.client.scheduler_info()
        self.workers = max(1, sum(int(w.get("nthreads", 1)) for w in info.get("workers", {}).values()))
        self.address = address

    def submit(self, fn, *args):
        return self.client.submit(fn, *args, pure=False)

    @staticmethod
    def result(fut):
        return fut.result()

    def wait_one(self, pending):
        # poll: distributed.wait() needs a default client, and this one is not made default
        delay = 0.005
        while True:
            done = [f for f in pending if f.done()]
            if done:
                return done
            time.sleep(delay)
            delay = min(0.1, delay * 1.5)

    def close(self):
        self.client.close()


def make_executor(workers: int | None = None, scheduler: str | None = None):
    if scheduler:
        return DaskExecutor(scheduler)
    workers = workers or os.cpu_count() or 1
    if workers <= 1:
        return InlineExecutor()
    return ProcessExecutor(workers)


def run_all(executor, fn, arglists: list, window: int | None = None, retries: int = 1):
    """Yield (index, result or exception) as tasks finish; at most ``window`` in flight.

    The window keeps memory small (spectra travel with tasks) and lets a
    killed run lose only the tasks in flight.  A task that raises yields its
    exception.  If the local pool breaks (a worker killed from outside), it
    is restarted and the tasks in flight are submitted again, ``retries``
    times at most.
    """
    window = window or max(2, 2 * executor.workers)
    nxt = 0
    pending = {}
    attempts = [0] * len(arglists)

    def submit(j):
        pending[executor.submit(fn, *arglists[j])] = j

    while nxt < len(arglists) and len(pending) < window:
        submit(nxt)
        nxt += 1
    while pending:
        for fut in executor.wait_one(list(pending)):
            i = pending.pop(fut)
            try:
                res = executor.result(fut)
            except Exception as exc:
                broken = getattr(executor, "is_broken", lambda e: False)(exc)
                if not broken:
                    yield i, exc
                    res = None
                else:
                    lost = [i] + list(pending.values())
                    pending.clear()
                    executor.restart()
                    for j in lost:
                        attempts[j] += 1
                        if attempts[j] > retries:
                            yield j, exc
                        else:
                            submit(j)
                    break
            else:
                yield i, res
            if nxt < len(arglists):
                submit(nxt)
                nxt += 1
        while nxt < len(arglists) and len(pending) < window:
            submit(nxt)
            nxt += 1


# --- progress ------------------------------------------------------------------

class Progress:
    """A progress bar on standard error (tqdm): items done, elapsed time and time left.

    Shown only on a terminal (never in a log or a pipe); time left is
    extrapolated from the work done, weighted by each item's estimated cost
    (the bar's total is the total cost).
    """

    def __init__(self, phase: str, total_items: int, total_cost: float | None = None,
                 unit: str = "races", enabled: bool = True, stream=None):
        from tqdm import tqdm

        self.phase, self.total, self.unit = phase, total_items, unit
        self.total_cost = float(total_cost) if total_cost else float(total_items)
        self.done = 0
        self.stream = stream or sys.stderr
        tty = hasattr(self.stream, "isatty") and self.stream.isatty()
        self.enabled = bool(enabled and total_items > 0 and tty)
        self.bar = tqdm(total=self.total_cost, desc=phase, file=self.stream, leave=True,
                        disable=not self.enabled, dynamic_ncols=True,
                        bar_format="{desc}: {percentage:3.0f}%|{bar}| {postfix} "
                                   "[{elapsed}<{remaining}]")
        self._post()

    def _post(self) -> None:
        if self.enabled:
            self.bar.set_postfix_str(f"{self.done}/{self.total} {self.unit}", refresh=False)

    def advance(self, n: int = 1, cost: float | None = None) -> None:
        self.done += n
        self._post()
        self.bar.update(cost if cost is not None else n * self.total_cost / max(self.total, 1))

    def finish(self) -> None:
        self.bar.close()
