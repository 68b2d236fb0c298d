"""Planning a batch: which races, which primitive spectra, and how far each must go.

A batch over moduli Q asks for every two-way race delta(q; a, b) with a < b
(the reverse race is 1 - delta(q; a, b), exactly, since under LI the limit
law has no atom at 0), the residue race for each q, and any race the user
adds.  Each race needs the spectra of the primitive characters inducing the
characters mod q with W(chi) != 0; chi mod q* serves every multiple of q*.

The plan asks, for each primitive character, the largest height, the finest
zero width and the most (and most accurate) power sums that any race of the
batch will request in the driver's first round, so each spectrum is computed
once, before the races run (:func:`spectrum_requests`).  The requests are the
driver's own first-round plan (:func:`certify.races.plan_race`); if the driver
asks for more (a refinement round), the spectrum is extended where it is
needed and stored again: the plan only saves work, it certifies nothing.
"""

from __future__ import annotations

import hashlib
import itertools
import math
from dataclasses import dataclass

from ..arith import workprec
from ..errors import BadInput
from ..race.question import (RaceQuestion, parse_weight_items, residue_race, spectral_groups,
                             two_way, weighted)
from ..source.dirichlet import check_modulus, reduced_residues


@dataclass(frozen=True)
class RaceItem:
    """One race of a batch, with a stable identifier used for file names."""

    question: RaceQuestion

    @property
    def modulus(self) -> int:
        return self.question.modulus

    @property
    def slug(self) -> str:
        q = self.question
        if q.kind == "two-way":
            a, b = q.classes
            return f"q{q.modulus}/two-way_{q.modulus}_{a}_{b}"
        if q.kind == "residues":
            return f"q{q.modulus}/residues_{q.modulus}"
        h = hashlib.sha256(repr(q.weights).encode()).hexdigest()[:12]
        return f"q{q.modulus}/weighted_{q.modulus}_{h}"


def parse_moduli(text: str) -> list[int]:
    """'3-30', '5,7,11-13' -> sorted list of moduli (each >= 3)."""
    out = set()
    for part in str(text).replace(" ", "").split(","):
        if not part:
            continue
        try:
            if "-" in part:
                lo, hi = part.split("-", 1)
                lo, hi = int(lo), int(hi)
                if hi < lo:
                    raise BadInput(f"empty range of moduli {part!r}")
                if hi - lo > 100000:
                    raise BadInput(f"range of moduli {part!r} is too long")
                out.update(range(lo, hi + 1))
            else:
                out.add(int(part))
        except ValueError:
            raise BadInput(f"moduli must be integers or ranges such as 3-30, got {part!r}") from None
    if not out:
        raise BadInput("no modulus given")
    for q in sorted(out):
        if q < 3:
            raise BadInput(f"modulus {q}: races need q >= 3 (there is one reduced class mod {q})")
        check_modulus(q)
    return sorted(out)


def parse_race(text: str) -> RaceQuestion:
    """A race given on the command line.

    ``Q:A,B`` (two-way, pi(x;Q,A) > pi(x;Q,B)), ``Q:N,R`` (residue race) or
    ``Q:A=W,B=W,...`` (weighted, rational weights summing to 0).
    """
    s = str(text).replace(" ", "")
    if ":" not in s:
        raise BadInput(f"race {text!r} is not of the form Q:A,B or Q:N,R or Q:A=W,B=W,...")
    qs, rest = s.split(":", 1)
    try:
        q = int(qs)
    except ValueError:
        raise BadInput(f"race {text!r}: modulus must be an integer") from None
    if rest.upper() == "N,R":
        return residue_race(q)
    parts = [p for p in rest.split(",") if p]
    if parts and all("=" in p for p in parts):
        return weighted(q, parse_weight_items(parts, "=", f"race {text!r}"))
    if len(parts) == 2 and not any("=" in p for p in parts):
        try:
            a, b = int(parts[0]), int(parts[1])
        except ValueError:
            raise BadInput(f"race {text!r}: classes must be integers") from None
        return two_way(q, a, b)
    raise BadInput(f"race {text!r} is not of the form Q:A,B or Q:N,R or Q:A=W,B=W,...")


def table_equivalences(moduli: list[int], kinds=("two-way", "residues")) -> list:
    """One :class:`certify.batch.symmetry.Equivalence` per table row.

    Rows: the residue race and every ordered pair a != b of reduced classes, for each
    modulus; each names the computed race it equals and why (exact symmetries).
    """
    from .symmetry import canonical_residue, canonical_two_way

    out = []
    for q in moduli:
        if "residues" in kinds:
            try:
                residue_race(q)
                out.append(canonical_residue(q))
            except BadInput:
                pass
        if "two-way" in kinds:
            for a, b in itertools.permutations(reduced_residues(q), 2):
                out.append(canonical_two_way(q, a, b))
    return out


def races_for(moduli: list[int], kinds=("two-way", "residues"), extra=(),
              symmetries: bool = False) -> list[RaceItem]:
    """The races of a batch, in a stable order (by modulus, then kind, then classes).

    With ``symmetries`` only one race per distinct law is listed (the
    representative named by :func:`table_equivalences`; its modulus may be q/2).
    """
    items: dict[str, RaceItem] = {}
    if symmetries:
        for e in table_equivalences(moduli, kinds):
            qn = (residue_race(e.target_q) if e.target_a is None
                  else two_way(e.target_q, e.target_a, e.target_b))
            it = RaceItem(qn)
            items.setdefault(it.slug, it)
        moduli = []
    for q in moduli:
        if "residues" in kinds:
            try:
                it = RaceItem(residue_race(q))
                items[it.slug] = it
            except BadInput:
                pass  # every class a square: no residue race
        if "two-way" in kinds:
            for a, b in itertools.combinations(reduced_residues(q), 2):
                it = RaceItem(two_way(q, a, b))
                items[it.slug] = it
    for qn in extra:
        if qn.kind == "two-way" and qn.classes[0] > qn.classes[1]:
            qn = two_way(qn.modulus, qn.classes[1], qn.classes[0])  # the reverse is free
        it = RaceItem(qn)
        items.setdefault(it.slug, it)
    return sorted(items.values(), key=lambda it: (it.modulus, _kind_order(it.question.kind), it.slug))


def _kind_order(kind: str) -> int:
    return {"residues": 0, "two-way": 1}.get(kind, 2)


# --- spectra requirements -------------------------------------------------

@dataclass
class Request:
    """What one primitive spectrum must hold to serve every race of a batch."""

    conductor: int
    label: int
    parity: int
    height: float = 0.0
    width: float = float("inf")
    moments: int = 0
    bits: int = 0
    races: int = 0

    @property
    def key(self) -> tuple[int, int]:
        return (self.conductor, self.label)

    def widen(self, height, width, moments, bits):
        self.height = max(self.height, height)
        self.width = min(self.width, width)
        self.moments = max(self.moments, moments)
        self.bits = max(self.bits, bits)
        self.races += 1

    @property
    def cost(self) -> float:
        """A relative cost estimate (for ordering work: biggest first)."""
        return (self.height * math.log(2 + self.conductor * self.height) ** 2
                + 0.02 * self.moments * self.bits)


def first_round_requests(question: RaceQuestion, digits: int, store) -> list[tuple]:
    """The (conductor, label, parity, height, width, moments, bits) the driver asks first.

    Taken from the driver's own public plan (:func:`certify.races.plan_race`),
    so the batch computes exactly what the races will ask in their first round;
    ``store`` supplies the first power sums (cheap), used for the exact variance.
    If a race needs more (a refinement round), it extends the spectra itself
    (counted as ``extended_by_races`` in the batch summary).
    """
    return first_round_plan(question, digits, store)[1]


def first_round_plan(question: RaceQuestion, digits: int, store) -> tuple:
    """(plan, requests): the race's plan (:func:`certify.races.plan_race`) and the
    requests of :func:`first_round_requests`."""
    from ..races import plan_race

    plan = plan_race(question, digits, store)
    with workprec(plan.prec):
        groups = spectral_groups(question)
    return plan, [tuple(r) for r in plan.spectrum_requests(groups)]


def spectrum_requests(items: list[RaceItem], digits: int, store=None,
                      plans: dict | None = None) -> dict:
    """{(conductor, label): Request} covering the first round of every race in ``items``.

    ``plans``, if given, receives {slug: plan as plain data} (:meth:`RacePlan.to_wire`),
    so the races need not plan again."""
    from ..spectrum.spectrum import SpectrumStore

    store = store if store is not None else SpectrumStore()
    reqs: dict[tuple[int, int], Request] = {}
    for it in items:
        plan, first = first_round_plan(it.question, digits, store)
        if plans is not None:
            plans[it.slug] = plan.to_wire()
        for (c, n, par, h, w, k, b) in first:
            r = reqs.setdefault((c, n), Request(c, n, par))
            r.widen(h, w, k, b)
    return reqs
