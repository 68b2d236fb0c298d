"""The certificate: an immutable, versioned record of one certified density.

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

import json
from dataclasses import dataclass
from fractions import Fraction
from types import MappingProxyType
from typing import Any, Mapping

from ..arith import arb, ball_from_strings, ball_strings
from ..errors import BadInput

SCHEMA_ID = "certify/race-certificate"
SCHEMA_VERSION = 1
SUPPORTED_VERSIONS = (1,)

SECTIONS = ("question", "answer", "hypotheses", "error_budget", "parameters", "spectrum",
            "provenance", "references", "caution")


def freeze(obj: Any) -> Any:
    """A read-only deep copy: dicts become mapping proxies, lists become tuples."""
    if isinstance(obj, Mapping):
        return MappingProxyType({str(k): freeze(v) for k, v in obj.items()})
    if isinstance(obj, (list, tuple)):
        return tuple(freeze(v) for v in obj)
    return obj


def thaw(obj: Any) -> Any:
    """The plain JSON-ready copy of a frozen value."""
    if isinstance(obj, Mapping):
        return {k: thaw(v) for k, v in obj.items()}
    if isinstance(obj, tuple):
        return [thaw(v) for v in obj]
    return obj


def ball_record(x: arb) -> dict:
    """``{"mid", "rad"}`` exact decimal strings of a ball."""
    mid, rad = ball_strings(x)
    return {"mid": mid, "rad": rad}


def ball_of(record: Mapping, where: str = "ball") -> arb:
    """The ball of a ``{"mid", "rad"}`` record (containing the ball that was stored)."""
    try:
        mid, rad = record["mid"], record["rad"]
        if Fraction(rad) < 0:
            raise ValueError("negative radius")
        return ball_from_strings(mid, rad)
    except (KeyError, TypeError, ValueError, ZeroDivisionError) as exc:
        raise BadInput(f"{where}: not a ball record {{mid, rad}} of decimal strings ({exc})") from None


@dataclass(frozen=True)
class Certificate:
    """One certified density with its question, hypotheses, evidence and data.

    Attributes
    ----------
    kind : str
        ``"dirichlet-race"`` (a race over Q).
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
        """Rebuild a certificate, refusing unknown schemas and versions (BadInput)."""
        if not isinstance(data, dict):
            raise BadInput(f"{source}: a certificate is a JSON object, got {type(data).__name__}")
        if data.get("schema") != SCHEMA_ID:
            raise BadInput(f"{source}: not a certify race certificate "
                           f"(schema {data.get('schema')!r}, expected {SCHEMA_ID!r})")
        version = data.get("schema_version")
        if version not in SUPPORTED_VERSIONS:
            raise BadInput(f"{source}: unknown schema version {version!r} "
                           f"(this certify reads version {', '.join(map(str, SUPPORTED_VERSIONS))})")
        validate_structure(data, source)
        return cls(**{name: data[name] for name in SECTIONS}, kind=data["kind"],
                   schema_version=version)


def validate_structure(data: dict, source: str) -> None:
    """Check ``data`` against the JSON Schema file (jsonschema if installed, else key checks)."""
    try:
        import jsonschema
    except ImportError:  # the schema's required keys, checked by hand
        for name in SECTIONS + ("kind",):
            if name not in data:
                raise BadInput(f"{source}: missing section {name!r}") from None
        return
    from .schema import load_schema

    validator = jsonschema.Draft202012Validator(load_schema())
    errors = sorted(validator.iter_errors(data), key=lambda e: list(e.absolute_path))
    if errors:
        e = errors[0]
        where = "/".join(str(p) for p in e.absolute_path) or "(top level)"
        msg = e.message if len(e.message) < 160 else e.message[:157] + "..."
        raise BadInput(f"{source}: does not match the certificate schema at {where}: {msg}")


def read_certificate(path: str) -> Certificate:
    """Load a certificate file; every failure is a one-line BadInput naming file (and line)."""
    try:
        with open(path, encoding="utf-8") as fh:
            text = fh.read()
    except OSError as exc:
        raise BadInput(f"{path}: cannot read ({exc.strerror or exc})") from None
    except UnicodeDecodeError:
        raise BadInput(f"{path}: not a UTF-8 text file") from None
    try:
        data = json.loads(text)
    except json.JSONDecodeError as exc:
        raise BadInput(f"{path}:{exc.lineno}: malformed JSON: {exc.msg} (column {exc.colno})") from None
    return Certificate.from_dict(data, path)


def write_certificate(cert: Certificate, path: str) -> None:
    from ..io import write_atomic

    write_atomic(path, cert.to_json())
