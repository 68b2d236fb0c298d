"""One entry point for every kind of certificate: read, verify, expand tables and folders.

``verify_paths`` takes files, folders and table index files:

* a certificate file (any kind) is verified by its kind's verifier;
* a folder is every certify JSON file in it (certificates, and tables whose
  rows are checked against the certificates they name);
* a table index (``kind: "table"``) names one certificate file per row, relative
  to the index; each is verified, and the row's shown enclosure must be the
  certificate's.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

from ..errors import BadInput, CertifyError
from .model import CERTIFICATE_KINDS, Certificate, read_document, thaw
from .verify import VerifyReport

MAX_FILES = 100000


def verify_any(cert: Certificate) -> VerifyReport:
    """Re-check a certificate of any kind from what it stores (see each kind's module)."""
    if cert.kind == "dirichlet-race":
        from .verify import verify_certificate

        return verify_certificate(cert)
    if cert.kind == "ffield-race":
        from .ffield import verify_ffield

        return verify_ffield(cert)
    if cert.kind == "order-race":
        from .order import verify_order_certificate

        return verify_order_certificate(cert)
    if cert.kind == "curve-race":
        from .curves import verify_curve

        return verify_curve(cert)
    if cert.kind == "ecq-race":
        from .ecq import verify_ecq

        return verify_ecq(cert)
    if cert.kind == "twist-family-race":
        from .twists import verify_twist_family

        return verify_twist_family(cert)
    raise BadInput(f"no verifier for kind {cert.kind!r}")


@dataclass
class Outcome:
    """The verification of one file (a certificate, or a table's row)."""

    path: str
    report: VerifyReport
    error: str = ""  # set when the file could not be read as a certify document


def _refused(path: str, exc: Exception) -> Outcome:
    rep = VerifyReport(os.path.basename(path))
    rep.add("readable certify document", False, str(exc))
    return Outcome(path, rep, str(exc))


def _verify_file(path: str, seen: set) -> list:
    real = os.path.realpath(path)
    if real in seen:
        return []
    seen.add(real)
    try:
        data = read_document(path)
        if data["kind"] in CERTIFICATE_KINDS:
            return [Outcome(path, verify_any(Certificate.from_dict(data, path)))]
        if data["kind"] == "table":
            return _verify_table(path, data, seen)
        if data["kind"] == "twist-family":
            return _verify_twist_bundle(path, data)
        if data["kind"] == "order-family":
            from .order import verify_family

            return [Outcome(path, rep) for rep in verify_family(data, path)]
        raise BadInput(f"{path}: a {data['kind']!r} document has nothing to verify")
    except CertifyError as exc:
        return [_refused(path, exc)]


def _verify_twist_bundle(path: str, data: dict) -> list:
    """A ``twist-family`` document (``certify twists --json`` for several degrees): each
    certificate it holds verified, then the bundle's own claims (its degrees, one curve)."""
    certs = data.get("certificates")
    if not isinstance(certs, list) or not certs:
        raise BadInput(f"{path}: a twist-family document holds no certificates")
    out = []
    for i, c in enumerate(certs[:100]):
        if not isinstance(c, dict) or c.get("kind") != "twist-family-race":
            raise BadInput(f"{path}: entry {i + 1} is not a twist-family-race certificate")
        cert = Certificate.from_dict(c, f"{path}: degree entry {i + 1}")
        out.append(Outcome(path, verify_any(cert)))
    rep = VerifyReport(f"twist families in {os.path.basename(path)}")
    q = data.get("question") or {}
    ds = [c["question"]["d"] for c in certs]
    curves = {(c["question"]["q"], c["question"]["A"], c["question"]["B"], c["question"]["n"],
               c["question"]["mode"]) for c in certs}
    rep.add("bundle: the twist degrees listed are those of the certificates, once each",
            q.get("twist_degrees") == ds and len(set(ds)) == len(ds), f"listed {q.get('twist_degrees')}, "
            f"certificates {ds}")
    rep.add("bundle: one curve, field and mode", len(curves) == 1, f"{len(curves)} different")
    # the curve the bundle names is the one in every certificate's (verified) label
    named = str(q.get("base_curve"))
    rep.add("bundle: the base curve named is that of the certificates",
            all(str(c["question"].get("label", "")).endswith(f"of E: {named}") for c in certs),
            f"bundle names {named[:80]!r}")
    rep.add("bundle: no field beyond its question, certificates, caution and written files",
            set(data) <= {"schema", "schema_version", "kind", "question", "certificates", "caution",
                          "figure"} and set(q) == {"kind", "base_curve", "twist_degrees"},
            f"fields {sorted(data)}, question fields {sorted(q)}")
    rep.add("bundle: the caution is that of the last certificate", data.get("caution") == certs[-1]["caution"],
            "differs")
    return out + [Outcome(path, rep)]


def _verify_table(path: str, data: dict, seen: set) -> list:
    """Every row's certificate verified, and the row's numbers compared with it."""
    base = os.path.dirname(os.path.abspath(path))
    rep = VerifyReport(f"table {data.get('title', '')}".strip())
    out = [Outcome(path, rep)]
    rows = data["rows"]
    rep.add("table: at least one row", bool(rows), "the table has no rows")
    for i, row in enumerate(rows):
        name = row.get("certificate")
        if not isinstance(name, str) or not name or os.path.isabs(name) or ".." in name.split("/"):
            rep.add(f"row {i + 1}: names a certificate file inside the table's folder", False,
                    f"certificate {str(name)[:80]!r}")
            continue
        cpath = os.path.join(base, name)
        try:
            cert = Certificate.from_dict(read_document(cpath), cpath)
        except CertifyError as exc:
            rep.add(f"row {i + 1}: certificate {name} readable", False, str(exc))
            continue
        enc = cert.answer["enclosure"]
        if row.get("flip"):
            # a row equal to the reversed race: 1 - delta, ends swapped (exact decimals)
            from decimal import Decimal, localcontext

            with localcontext() as ctx:
                ctx.prec = 400
                want = (str(Decimal(1) - Decimal(enc["upper"])),
                        str(Decimal(1) - Decimal(enc["lower"])))
            shown = (row.get("equals"), row.get("lower"), row.get("upper"))
            stored = (cert.label, *want)
        else:
            shown = (row.get("equals"), row.get("lower"), row.get("upper"))
            stored = (cert.label, enc["lower"], enc["upper"])
        rep.add(f"row {i + 1} ({str(row.get('label'))[:40]}): enclosure is that of {name}"
                + (" (1 - delta)" if row.get("flip") else ""), shown == stored,
                f"row shows {shown}, the certificate gives {stored}")
        real = os.path.realpath(cpath)
        if real not in seen:
            seen.add(real)
            out.append(Outcome(cpath, verify_any(cert)))
    return out


def _is_document(path: str) -> bool:
    """True unless the file is JSON without a ``schema`` key (a batch summary, a result)."""
    import json

    try:
        with open(path, encoding="utf-8") as fh:
            head = fh.read(4096)
    except OSError:
        return True
    if '"schema"' in head:
        return True
    try:
        with open(path, encoding="utf-8") as fh:
            data = json.load(fh)
    except (OSError, ValueError, RecursionError):
        return True  # unreadable: reported as such
    return not isinstance(data, dict) or "schema" in data


def expand(paths: list) -> list:
    """Files to verify: the given files, and every certify ``*.json`` document of a given
    folder (a table index there covers the certificates it names in sub-folders; JSON files
    that are not certify documents, such as batch summaries, are skipped)."""
    import sys

    files = []
    for p in paths:
        if os.path.isdir(p):
            names = sorted(n for n in os.listdir(p) if n.endswith(".json") and not n.startswith("."))
            docs = [os.path.join(p, n) for n in names if _is_document(os.path.join(p, n))]
            for n in names:
                if os.path.join(p, n) not in docs:
                    print(f"certify: note: {os.path.join(p, n)} is not a certify document; skipped",
                          file=sys.stderr)
            if not docs:
                raise BadInput(f"{p}: no certify .json document in this folder")
            files.extend(docs)
        else:
            files.append(p)
        if len(files) > MAX_FILES:
            raise BadInput(f"more than {MAX_FILES} files to verify")
    return files


def verify_paths(paths: list) -> list:
    """[Outcome] for every certificate reachable from ``paths`` (tables first, then rows)."""
    seen: set = set()
    files = expand(paths)
    # tables first, so that a folder's certificates are reported under their table once
    docs = []
    for f in files:
        docs.extend(_verify_file(f, seen))
    return docs


def report_dict(outcomes: list) -> dict:
    """The ``--json`` document of a verify run (kind ``verify-report``)."""
    from .model import envelope

    return envelope("verify-report", {
        "ok": all(o.report.ok for o in outcomes) and bool(outcomes),
        "certificates": [{"file": o.path, "label": o.report.label, "ok": o.report.ok,
                          "seconds": round(o.report.seconds, 3),
                          "original_seconds": o.report.original_seconds,
                          "checks": [{"name": c.name, "ok": c.ok, "detail": c.detail}
                                     for c in o.report.checks]} for o in outcomes],
    })


__all__ = ["verify_any", "verify_paths", "report_dict", "expand", "Outcome", "thaw"]
