"""The certificate: an immutable, versioned record of one certified density (any setting).

A :class:`Certificate` is built once from a race result
(:mod:`certify.certificate.build`), written as JSON, read back, rendered and
re-verified.  Every file carries ``schema`` and ``schema_version``; a reader
refuses versions it does not know.  Balls are stored exactly: a ball is a pair
of decimal strings ``{"mid": ..., "rad": ...}`` that are the exact dyadic
midpoint and radius, parsed back by :func:`certify.arith.ball_from_strings`
(which returns a ball containing the original).

The sections are deep-frozen (mappings become read-only views, lists become
tuples), so a certificate cannot be edited after it is made; a modified copy
must be built from a dictionary and will be judged by ``verify`` on its own.
"""

from __future__ import annotations

import functools
import json
import os
import re
from dataclasses import dataclass
from fractions import Fraction
from types import MappingProxyType
from typing import Any, Mapping

from ..arith import arb, ball_from_strings, ball_strings
from ..errors import BadInput

SCHEMA_ID = "certify/certificate"
SCHEMA_VERSION = 2
SUPPORTED_VERSIONS = (2,)

#: Kinds of certificate: one certified number each, re-checked by ``certify verify``.
CERTIFICATE_KINDS = ("dirichlet-race", "ffield-race", "curve-race", "order-race", "ecq-race",
                     "twist-family-race")
#: Kinds of other documents certify writes with ``--json`` (same envelope, same schema).
REPORT_KINDS = ("verify-report", "referee-report", "table", "l-polynomials", "twist-family",
                "cache-report", "batch-report", "ec-race-result", "order-result",
                "order-family", "li-race-result")

#: Limits applied before any work starts (the schema states the same bounds).
MAX_FILE_BYTES = 64 * 2**20
MAX_DEPTH = 64

SECTIONS = ("question", "answer", "hypotheses", "error_budget", "parameters", "spectrum",
            "provenance", "references", "caution")


def freeze(obj: Any) -> Any:
    """A read-only deep copy: dicts become mapping proxies, lists become tuples."""
    t = type(obj)
    if t is str or t is int or t is float or t is bool or obj is None:
        return obj  # the common leaves first: a certificate holds ~10^5 of them
    if t is dict or t is MappingProxyType or isinstance(obj, Mapping):
        return MappingProxyType({str(k): freeze(v) for k, v in obj.items()})
    if t is list or t is tuple or isinstance(obj, (list, tuple)):
        return tuple(freeze(v) for v in obj)
    return obj


def thaw(obj: Any) -> Any:
    """The plain JSON-ready copy of a frozen value."""
    t = type(obj)
    if t is str or t is int or t is float or t is bool or obj is None:
        return obj
    if t is MappingProxyType or t is dict or isinstance(obj, Mapping):
        return {k: thaw(v) for k, v in obj.items()}
    if t is tuple or isinstance(obj, tuple):
        return [thaw(v) for v in obj]
    return obj


def ball_record(x: arb) -> dict:
    """``{"mid", "rad"}`` exact decimal strings of a ball."""
    mid, rad = ball_strings(x)
    return {"mid": mid, "rad": rad}


_NUMBER = re.compile(r"-?[0-9]{1,15}(\.[0-9]{1,8000})?|-?[0-9](\.[0-9]{1,60})?e[-+]?[0-9]{1,4}"
                     r"|-?[0-9]{1,400}/[0-9]{1,400}")
_ABSURD = re.compile(r"^[-+]?[0-9.]*[0-9][eE][-+]?[0-9]{5,}$")


def safe_fraction(text, where: str = "number") -> Fraction:
    """Fraction(text) for the bounded forms certify writes (decimal, scientific with an exponent
    of at most 4 digits, p/q); anything else is refused before any big-number work."""
    if isinstance(text, int) and not isinstance(text, bool) and abs(text) < 10**400:
        return Fraction(text)
    if not isinstance(text, str) or not _NUMBER.fullmatch(text):
        raise BadInput(f"{where}: {str(text)[:40]!r} is not a bounded decimal, scientific or "
                       "rational number")
    return Fraction(text)


def ball_of(record: Mapping, where: str = "ball") -> arb:
    """The ball of a ``{"mid", "rad"}`` record (containing the ball that was stored)."""
    try:
        mid, rad = record["mid"], record["rad"]
        if type(mid) is str and type(rad) is str:
            return _ball_of_strings(mid, rad, where)
        safe_fraction(mid, where)
        safe_fraction(rad, where)
        if Fraction(rad) < 0:
            raise ValueError("negative radius")
        return ball_from_strings(mid, rad)
    except (KeyError, TypeError, ValueError, ZeroDivisionError) as exc:
        raise BadInput(f"{where}: not a ball record {{mid, rad}} of decimal strings ({exc})") from None


@functools.lru_cache(maxsize=1 << 16)
def _ball_of_strings(mid: str, rad: str, where: str) -> arb:
    # memoised (a ball is immutable, a function of its two strings): a table's certificates
    # and their evidence sentences parse the same stored balls many times
    safe_fraction(mid, where)
    safe_fraction(rad, where)
    if Fraction(rad) < 0:
        raise ValueError("negative radius")
    return ball_from_strings(mid, rad)


@dataclass(frozen=True)
class Certificate:
    """One certified density with its question, hypotheses, evidence and data.

    Attributes
    ----------
    kind : str
        ``"dirichlet-race"`` (a race over Q), ``"ffield-race"`` (a race in F_q[t]) or
        ``"curve-race"`` (the trace race of an elliptic curve over F_q(t)); every kind
        has the same sections, the kind says what ``question`` and ``spectrum`` hold.
    question : Mapping
        Race kind, modulus, classes, exact weights, label, statement,
        normalisation and the density's definition.
    answer : Mapping
        The enclosure (decimal strings rounded outward, plus the engine's exact
        ball), certified digits, gaps to 1/2 and to 1 in scientific notation,
        mean and variance.
    hypotheses : tuple of Mapping
        Name, statement, status and structured evidence of each hypothesis.
    error_budget : tuple of Mapping
        Name, bound (decimal rounded up) and description of each error term.
    parameters : Mapping
        Every parameter the engine chose.
    spectrum : Mapping
        The data ``verify`` re-checks: zero enclosures, moments, scales.
    provenance : Mapping
        Versions, platform, reproducing command line, input digest, date.
    references : tuple of str
    caution : str
    schema_version : int
    """

    question: Mapping
    answer: Mapping
    hypotheses: tuple
    error_budget: tuple
    parameters: Mapping
    spectrum: Mapping
    provenance: Mapping
    references: tuple
    caution: str
    kind: str = "dirichlet-race"
    schema_version: int = SCHEMA_VERSION

    def __post_init__(self):
        for name in SECTIONS:
            object.__setattr__(self, name, freeze(getattr(self, name)))

    # -- convenient views -------------------------------------------------
    @property
    def label(self) -> str:
        return self.question["label"]

    @property
    def lower(self) -> Fraction:
        return Fraction(self.answer["enclosure"]["lower"])

    @property
    def upper(self) -> Fraction:
        return Fraction(self.answer["enclosure"]["upper"])

    def hypothesis(self, name: str) -> Mapping | None:
        for h in self.hypotheses:
            if h["name"] == name:
                return h
        return None

    # -- serialisation ----------------------------------------------------
    def to_dict(self) -> dict:
        out = {"schema": SCHEMA_ID, "schema_version": self.schema_version, "kind": self.kind}
        for name in SECTIONS:
            out[name] = thaw(getattr(self, name))
        return out

    def to_json(self) -> str:
        return json.dumps(self.to_dict(), indent=1, ensure_ascii=False) + "\n"

    @classmethod
    def from_dict(cls, data: Any, source: str = "<certificate>") -> "Certificate":
        """Rebuild a certificate, refusing unknown schemas, versions and kinds (BadInput)."""
        check_envelope(data, source)
        if data["kind"] not in CERTIFICATE_KINDS:
            raise BadInput(f"{source}: a {data['kind']!r} document is not a certificate "
                           f"(certificate kinds: {', '.join(CERTIFICATE_KINDS)})")
        validate_structure(data, source)
        return cls(**{name: data[name] for name in SECTIONS}, kind=data["kind"],
                   schema_version=data["schema_version"])

    # -- notebook display ---------------------------------------------------
    def _repr_html_(self) -> str:
        from ..render.notebook import certificate_html

        return certificate_html(self)

    def _repr_latex_(self) -> str:
        from ..render.notebook import certificate_latex

        return certificate_latex(self)


def envelope(kind: str, body: dict) -> dict:
    """A non-certificate document (``--json`` of reports, tables, listings) in the common envelope."""
    if kind not in REPORT_KINDS + CERTIFICATE_KINDS:
        raise ValueError(f"unknown document kind {kind!r}")
    return {"schema": SCHEMA_ID, "schema_version": SCHEMA_VERSION, "kind": kind, **body}


def check_envelope(data: Any, source: str) -> None:
    if not isinstance(data, dict):
        raise BadInput(f"{source}: a certify document is a JSON object, got {type(data).__name__}")
    if data.get("schema") != SCHEMA_ID:
        raise BadInput(f"{source}: not a certify document "
                       f"(schema {str(data.get('schema'))[:60]!r}, expected {SCHEMA_ID!r})")
    version = data.get("schema_version")
    if type(version) is not int or version not in SUPPORTED_VERSIONS:
        shown = version if type(version) is int else repr(str(version)[:20])
        raise BadInput(f"{source}: unknown schema version {shown} "
                       f"(this certify reads version {', '.join(map(str, SUPPORTED_VERSIONS))})")
    if data.get("kind") not in CERTIFICATE_KINDS + REPORT_KINDS:
        raise BadInput(f"{source}: unknown document kind {str(data.get('kind'))[:40]!r}")


def validate_structure(data: dict, source: str) -> None:
    """Check ``data`` against the JSON Schema (jsonschema is a runtime dependency)."""
    import jsonschema

    from .schema import validator

    errors = sorted(validator().iter_errors(data), key=lambda e: list(e.absolute_path))
    if errors:
        e = errors[0]
        where = "/".join(str(p) for p in e.absolute_path) or "(top level)"
        msg = e.message if len(e.message) < 160 else e.message[:157] + "..."
        raise BadInput(f"{source}: does not match the certify schema at {where}: {msg}")
    del jsonschema


def validate_document(data: dict, source: str = "<document>") -> None:
    """Envelope and schema check of any document certify writes (certificate or report)."""
    check_envelope(data, source)
    validate_structure(data, source)


def _no_duplicates(pairs):
    out = {}
    for k, v in pairs:
        if k in out:
            raise _DuplicateKey(k)
        out[k] = v
    return out


class _DuplicateKey(ValueError):
    pass


def _refuse_constant(name):
    raise ValueError(f"{name} is not a number certify accepts")


def _parse_float(text: str) -> float:
    if _ABSURD.match(text) or len(text) > 400:
        raise ValueError(f"the number {text[:40]} has an absurd exponent or length")
    v = float(text)
    if v != v or v in (float("inf"), float("-inf")):
        raise ValueError(f"the number {text[:40]} is not finite")
    return v


def _scan(obj, depth: int = 0) -> None:
    """Refuse strings that are numbers with absurd exponents, anywhere in a document."""
    if isinstance(obj, str):
        if len(obj) < 400 and _ABSURD.match(obj.strip()):
            raise ValueError(f"the number {obj[:40]!r} has an absurd exponent")
    elif isinstance(obj, dict):
        for v in obj.values():
            _scan(v, depth + 1)
    elif isinstance(obj, list):
        for v in obj:
            _scan(v, depth + 1)


def _depth(text: str) -> int:
    """Nesting depth of brackets outside strings (a cheap guard before parsing)."""
    depth = best = 0
    in_str = esc = False
    for ch in text:
        if in_str:
            if esc:
                esc = False
            elif ch == "\\":
                esc = True
            elif ch == '"':
                in_str = False
        elif ch == '"':
            in_str = True
        elif ch in "[{":
            depth += 1
            if depth > best:
                best = depth
                if best > MAX_DEPTH:
                    return best
        elif ch in "]}":
            depth -= 1
    return best


def parse_json_strict(text: str, source: str) -> Any:
    """JSON as certify reads it: a leading BOM allowed; duplicate keys, NaN/Infinity,
    nesting deeper than MAX_DEPTH and oversized inputs refused (one-line BadInput)."""
    if len(text) > MAX_FILE_BYTES:
        raise BadInput(f"{source}: {len(text)} characters exceed the limit {MAX_FILE_BYTES}")
    if text.startswith("\ufeff"):
        text = text[1:]
    if _depth(text) > MAX_DEPTH:
        raise BadInput(f"{source}: JSON nested deeper than {MAX_DEPTH} levels")
    try:
        data = json.loads(text, object_pairs_hook=_no_duplicates, parse_constant=_refuse_constant,
                          parse_float=_parse_float)
        _scan(data)
        return data
    except _DuplicateKey as exc:
        raise BadInput(f"{source}: duplicate key {str(exc)[:60]!r} in a JSON object") from None
    except json.JSONDecodeError as exc:
        raise BadInput(f"{source}:{exc.lineno}: malformed JSON: {exc.msg} (column {exc.colno})") from None
    except (ValueError, RecursionError) as exc:
        raise BadInput(f"{source}: unreadable JSON ({str(exc)[:100]})") from None


def read_document(path: str) -> dict:
    """A certify JSON document (any kind) from a file, strictly parsed and schema-checked."""
    try:
        size = os.path.getsize(path)
        if size > MAX_FILE_BYTES:
            raise BadInput(f"{path}: {size} bytes exceed the limit {MAX_FILE_BYTES}")
        with open(path, encoding="utf-8") as fh:
            text = fh.read()
    except OSError as exc:
        raise BadInput(f"{path}: cannot read ({exc.strerror or exc})") from None
    except UnicodeDecodeError:
        raise BadInput(f"{path}: not a UTF-8 text file") from None
    data = parse_json_strict(text, path)
    validate_document(data, path)
    return data


def read_certificate(path: str) -> Certificate:
    """Load a certificate file; every failure is a one-line BadInput naming file (and line)."""
    return Certificate.from_dict(read_document(path), path)


def write_certificate(cert: Certificate, path: str) -> None:
    from ..io import write_atomic

    write_atomic(path, cert.to_json())
