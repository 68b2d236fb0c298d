"""A batch of races, end to end: plan, spectra, races, tables; resumable.

:func:`run_batch` is what ``certify table`` runs:

1. list the races (:func:`certify.batch.plan.races_for`) and skip those whose
   result file already exists in the output folder (a resumed run);
2. plan the spectra the remaining races need and compute, once each, those
   the cache does not already hold (phase "spectra"); each is stored in the
   cache as soon as it arrives, in its own transaction;
3. certify the races, a few of one modulus per task (phase "races"); each
   result is written at once, atomically, to ``OUT/results/q<q>/<race>.json``;
4. write the tables (LaTeX, CSV, Markdown), the ranking of the most biased
   races and ``OUT/batch.json`` (what ran, where the time went).

A run killed at any point (even SIGKILL) leaves complete result files and
complete cache entries only; running the same command again redoes only what
is missing.
"""

from __future__ import annotations

import json
import os
import time
from collections import defaultdict

from .. import __version__
from ..errors import BadInput, CertifyError, PrecisionExhausted
from ..io import write_atomic
from ..race.question import spectral_groups
from ..source.dirichlet import reduced_residues
from .cache import SOFTWARE_VERSION, CachedStore, SpectrumCache
from ..spectrum.moments import prefer_batch
from .execute import Progress, conductor_task, make_executor, race_task, run_all
from .plan import RaceItem, races_for, spectrum_requests, table_equivalences
from .serial import decode

CHUNK = 6


def result_path(out: str, item: RaceItem) -> str:
    return os.path.join(out, "results", item.slug + ".json")


def certificate_path(out: str, item: RaceItem) -> str:
    """The certificate of a computed race (``certify verify`` re-checks it)."""
    return os.path.join(out, "certificates", item.slug + ".json")


def _load_done(out: str, item: RaceItem, digits: int) -> dict | None:
    """A finished result for ``item`` at this target (None if absent, stale or unreadable)."""
    path = result_path(out, item)
    try:
        with open(path, encoding="utf-8") as fh:
            d = json.load(fh)
    except (OSError, ValueError):
        return None
    try:
        if d["provenance"]["certify"] != __version__:
            return None
        if d["density"]["target_width"] != f"1e-{digits}":
            return None
        if d["batch"]["slug"] != item.slug:
            return None
    except (KeyError, TypeError):
        return None
    return d


class WorkerSpectrumWarning(UserWarning):
    """A spectrum computed by a worker failed its re-check; the races compute it themselves."""


def recheck_worker_spectrum(req, res: dict, stats: dict):
    """A worker's spectrum, re-checked before anything uses it: ``(spectrum, blob, digest)`` or None.

    A worker is another process (or another machine): what it sends back is data.
    The coordinator applies the cache's re-check (:func:`certify.batch.recheck.recheck_spectrum`:
    power sums and L(1/2) re-derived, here by the per-character path where the worker
    used the batched one for its conductor; every zero's sign change re-certified) and
    checks that the spectrum is the one asked for.  What is shipped to the race tasks and
    stored in the cache holds the re-derived balls.  A spectrum that fails is refused
    with a warning (not shipped, not stored): the races that need it compute it in
    their own task, where the race driver checks every quantity itself.
    ``stats`` accumulates ``entries``, ``seconds`` (wall), ``cpu_seconds`` and ``refused``.
    """
    import warnings

    from .recheck import recheck_spectrum
    from .serial import encode

    t0, c0 = time.perf_counter(), time.process_time()
    name = f"chi_{{{req.conductor},{req.label}}}"
    try:
        sp = decode(res["blob"], res["digest"])
        if (sp.conductor, sp.label, sp.parity) != (req.conductor, req.label, req.parity):
            raise BadInput(f"the worker returned chi_{{{sp.conductor},{sp.label}}} (parity "
                           f"{sp.parity}) for {name} (parity {req.parity})")
        sp, _ = recheck_spectrum(sp)
    except (CertifyError, ArithmeticError, ValueError, KeyError, TypeError) as exc:
        stats["refused"] += 1
        stats["seconds"] += time.perf_counter() - t0
        stats["cpu_seconds"] += time.process_time() - c0
        warnings.warn(f"the spectrum of {name} computed by a worker was refused on re-check "
                      f"({exc}); the races that need it compute it themselves",
                      WorkerSpectrumWarning, stacklevel=2)
        return None
    blob, digest = encode(sp)
    stats["entries"] += 1
    stats["seconds"] += time.perf_counter() - t0
    stats["cpu_seconds"] += time.process_time() - c0
    return sp, blob, digest


def _chunks(items: list[RaceItem], size: int) -> list[list[RaceItem]]:
    by_q = defaultdict(list)
    for it in items:
        by_q[it.modulus].append(it)
    out = []
    # largest moduli first: they take longest, so the tail of the run stays short
    for q in sorted(by_q, reverse=True):
        lst = by_q[q]
        for i in range(0, len(lst), size):
            out.append(lst[i:i + size])
    return out


def _keys_of(item: RaceItem) -> list[tuple[int, int]]:
    return sorted({k for g in spectral_groups(item.question) for k in g.primitive_keys})


def run_batch(moduli: list[int], digits: int, out: str, workers: int | None = None,
              scheduler: str | None = None, cache_path: str | None = None,
              kinds=("two-way", "residues"), extra=(), top: int = 20, progress: bool = True,
              command_line: str = "", chunk: int = CHUNK, use_cache: bool = True,
              symmetries: bool = False) -> dict:
    """Certify every race of the batch and write its tables; returns the summary dict.

    Parameters
    ----------
    moduli : list of int
    digits : int
        Target width 10^-digits for every race.
    out : str
        Output folder (created); results, tables and ``batch.json`` go there.
    workers : int, optional
        Local processes (default: all cores; 1 runs in this process).
    scheduler : str, optional
        A dask.distributed scheduler address; overrides ``workers``.
    cache_path : str, optional
        The spectra cache (default :func:`certify.batch.cache.default_cache_path`).
    use_cache : bool
        False keeps spectra in a throw-away cache inside ``out``.
    symmetries : bool
        Certify one race per distinct law (exact symmetries,
        :mod:`certify.batch.symmetry`) and read every table row from the race it
        equals, saying why.
    """
    from .tables import write_tables

    if isinstance(digits, bool) or not isinstance(digits, int) or not (1 <= digits <= 60):
        raise BadInput(f"digits must be an integer between 1 and 60 (got {digits!r})")
    t_start = time.time()
    os.makedirs(out, exist_ok=True)
    if not use_cache:
        cache_path = os.path.join(out, "spectra-scratch.sqlite")
    cache = SpectrumCache(cache_path)
    cache.connection()
    items = races_for(moduli, kinds, extra, symmetries=symmetries)
    equivalences = table_equivalences(moduli, kinds) if symmetries else None
    if not items:
        raise BadInput("the batch has no race (no modulus with two reduced classes?)")
    done: dict[str, dict] = {}
    for it in items:
        d = _load_done(out, it, digits)
        if d is not None:
            done[it.slug] = d
    pending = [it for it in items if it.slug not in done]
    summary = {
        "moduli": moduli, "digits": digits, "races": len(items),
        "table_rows": len(equivalences) if equivalences is not None else None,
        "races_reused": len(done), "races_run": len(pending),
        "software": SOFTWARE_VERSION, "cache": cache.path,
        "spectra": {"needed": 0, "from_cache": 0, "computed": 0, "extended_by_races": 0},
        "timings_seconds": {}, "failures": [], "per_modulus": {}, "per_conductor": {},
        "command_line": command_line,
        "caution": ("Every density is conditional on GRH and LI for the L-functions used; "
                    "certify does not prove GRH or LI."),
    }
    executor = None
    written: dict = {}  # certificate path -> what the table index shows of it
    try:
        # ---- plan -------------------------------------------------------
        t0 = time.time()
        plan_store = CachedStore(backend=cache)
        plans: dict = {}  # slug -> the race's plan, shipped with it (planned once, here)
        reqs = spectrum_requests(pending, digits, plan_store, plans) if pending else {}
        keys_of = {it.slug: _keys_of(it) for it in pending}
        summary["timings_seconds"]["plan"] = round(time.time() - t0, 3)
        summary["spectra"]["needed"] = len(reqs)
        # ---- spectra ----------------------------------------------------
        t0 = time.time()
        todo = []
        blobs: dict[str, tuple[bytes, str]] = {}
        for key, r in sorted(reqs.items(), key=lambda kv: -kv[1].cost):
            got = cache.load_blob(key, r.height, r.width, r.moments, r.bits)
            if got is not None:
                blobs[f"{key[0]}.{key[1]}"] = got
                continue
            todo.append((r, cache.usable_start(key)))
        summary["spectra"]["from_cache"] = len(blobs)
        summary["spectra"]["recheck"] = {"entries": cache.rechecked,
                                         "seconds": round(cache.recheck_seconds, 3),
                                         "skipped": len(cache.damaged)}
        if pending:
            executor = make_executor(workers, scheduler)
            summary["executor"] = {"kind": executor.name, "workers": executor.workers}
        per_conductor = defaultdict(lambda: {"characters": 0, "zeros_s": 0.0, "moments_s": 0.0,
                                             "central_s": 0.0, "z_calls": 0, "zeros": 0})
        worker_recheck = {"entries": 0, "seconds": 0.0, "cpu_seconds": 0.0, "refused": 0}
        summary["spectra"]["worker_recheck"] = worker_recheck
        if todo:
            prog = Progress("spectra", len(todo), sum(r.cost for r, _ in todo), "L-functions",
                            enabled=progress)
            # several characters of one conductor go to one task: one batched pass computes
            # their power sums and their Hardy Z on the common grid (docs/method.md 2c, 3c)
            groups = defaultdict(list)
            for r, start in todo:
                groups[r.conductor].append((r, start))
            tasks = []
            for cnd, lst in groups.items():
                if prefer_batch(cnd, len(lst)):
                    tasks.append(lst)
                else:
                    tasks.extend([x] for x in lst)
            tasks.sort(key=lambda lst: -sum(r.cost for r, _ in lst))
            args = [([({"conductor": r.conductor, "label": r.label, "parity": r.parity,
                        "height": r.height, "width": r.width, "moments": r.moments,
                        "bits": r.bits}, start) for r, start in lst],) for lst in tasks]

            def _results():
                for i, got in run_all(executor, conductor_task, args):
                    for j, (r, _) in enumerate(tasks[i]):
                        yield r, (got if isinstance(got, BaseException) else got[j])

            for r, res in _results():
                if isinstance(res, BaseException):
                    if isinstance(res, CertifyError):
                        raise res
                    raise PrecisionExhausted(
                        f"not certified: the spectrum of chi_{{{r.conductor},{r.label}}} could "
                        f"not be computed ({type(res).__name__}: {res})")
                sp_seconds = sum(res["timings"].values())
                # a worker's output is data: re-checked before it is stored or shipped
                checked = recheck_worker_spectrum(r, res, worker_recheck)
                if checked is not None:
                    sp, blob, digest = checked
                    cache.save_blob(sp, blob, digest, sp_seconds)
                    blobs[f"{r.conductor}.{r.label}"] = (blob, digest)
                pc = per_conductor[r.conductor]
                pc["characters"] += 1
                pc["zeros_s"] += res["timings"]["zeros"]
                pc["moments_s"] += res["timings"]["moments"]
                pc["central_s"] += res["timings"]["central"]
                pc["z_calls"] += res["z_calls"]
                pc["zeros"] += res["zeros"]
                summary["spectra"]["computed"] += 1
                prog.advance(1, r.cost)
            prog.finish()
        worker_recheck["seconds"] = round(worker_recheck["seconds"], 3)
        worker_recheck["cpu_seconds"] = round(worker_recheck["cpu_seconds"], 3)
        summary["per_conductor"] = {str(c): {k: (round(v, 3) if isinstance(v, float) else v)
                                             for k, v in d.items()}
                                    for c, d in sorted(per_conductor.items())}
        summary["timings_seconds"]["spectra"] = round(time.time() - t0, 3)
        # ---- races --------------------------------------------------------
        t0 = time.time()
        per_q = defaultdict(lambda: {"races": 0, "density_s": 0.0, "race_spectra_s": 0.0,
                                     "total_s": 0.0, "z_calls_in_races": 0})
        if pending:
            chunks = _chunks(pending, chunk)
            args = []
            for ch in chunks:
                keys = sorted({k for it in ch for k in keys_of[it.slug]})
                shipped = {f"{c}.{n}": blobs[f"{c}.{n}"] for c, n in keys if f"{c}.{n}" in blobs}
                args.append(([(it.slug, it.question) for it in ch], digits, shipped, command_line,
                             [plans.get(it.slug) for it in ch]))
            prog = Progress("races", len(pending), enabled=progress)
            for i, results in run_all(executor, race_task, args):
                if isinstance(results, BaseException):
                    results = [{"slug": it.slug, "ok": False,
                                "error": f"not certified: the worker failed "
                                         f"({type(results).__name__}: {results})"}
                               for it in chunks[i]]
                for res in results:
                    it = next(x for x in chunks[i] if x.slug == res["slug"])
                    for ns in res.get("new_spectra", []):
                        if cache.save_merged(decode(ns["blob"], ns["digest"]), ns["blob"],
                                             ns["digest"]) is not None:
                            summary["spectra"]["extended_by_races"] += 1
                    if not res["ok"]:
                        summary["failures"].append({"race": it.question.label, "slug": it.slug,
                                                    "error": res["error"]})
                        prog.advance(1)
                        continue
                    write_atomic(result_path(out, it), res["result_text"])
                    if res.get("certificate_text"):
                        write_atomic(certificate_path(out, it), res["certificate_text"])
                        written[certificate_path(out, it)] = res["certificate_summary"]
                    done[it.slug] = res["result"]
                    pq = per_q[it.modulus]
                    pq["races"] += 1
                    pq["density_s"] += res["timings"].get("density", 0.0)
                    pq["race_spectra_s"] += res["timings"].get("spectra", 0.0)
                    pq["total_s"] += res["seconds"]
                    pq["z_calls_in_races"] += res["z_calls"]
                    prog.advance(1)
            prog.finish()
        summary["timings_seconds"]["races"] = round(time.time() - t0, 3)
    finally:
        if executor is not None:
            executor.close()
        cache.close()
    # ---- per modulus cost: its races plus the spectra of its characters ----------
    for q in moduli:
        phi = len(reduced_residues(q))
        pq = per_q.get(q, {"races": 0, "density_s": 0.0, "race_spectra_s": 0.0, "total_s": 0.0,
                           "z_calls_in_races": 0})
        summary["per_modulus"][str(q)] = {"q": q, "phi": phi,
                                          **{k: (round(v, 3) if isinstance(v, float) else v)
                                             for k, v in pq.items()}}
    # ---- outputs ----------------------------------------------------------
    t0 = time.time()
    ordered = [(it, done.get(it.slug)) for it in items]
    files = write_tables(out, ordered, digits, top=top, command_line=command_line,
                         equivalences=equivalences, certificates=written)
    summary["timings_seconds"]["tables"] = round(time.time() - t0, 3)
    summary["timings_seconds"]["total"] = round(time.time() - t_start, 3)
    summary["files"] = files
    summary["not_met"] = sum(1 for _, d in ordered if d is not None and not d["density"]["target_met"])
    summary["missing"] = sum(1 for _, d in ordered if d is None)
    write_atomic(os.path.join(out, "batch.json"), json.dumps(summary, indent=1) + "\n")
    return summary
