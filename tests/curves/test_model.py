"""Curves over F_q(t): refusals, minimal models, reduction types, conductor."""

import numpy as np
import pytest

from certify.curves.model import kodaira_type, make_curve
from certify.curves.traces import degree_data
from certify.errors import BadInput
from certify.ffield.poly import finite_field, parse_poly


@pytest.mark.parametrize("q", [2, 3, 9, 27, 4])
def test_small_characteristic_refused(q):
    with pytest.raises(BadInput, match="characteristic"):
        make_curve(q, "t", "t + 1")


@pytest.mark.parametrize("A,B,what", [("0", "t", "isotrivial"), ("t", "0", "isotrivial"),
                                     ("t^2", "2*t^3", "isotrivial"), ("2", "t^6 + 1", None)])
def test_isotrivial_and_singular_refused(A, B, what):
    if what:
        with pytest.raises(BadInput, match=what):
            make_curve(5, A, B)
    else:
        make_curve(5, A, B)  # j = 6912*8/(32 + 27 B^2) is not constant


def test_singular_refused():
    # 4A^3 + 27B^2 = 0 with A = -3 s^2, B = 2 s^3 (s = t): a nodal family everywhere
    with pytest.raises(BadInput, match="singular"):
        make_curve(7, "-3*t^2", "2*t^3")


def test_non_minimal_model_is_reduced():
    E = make_curve(5, "t^4*(t + 1)", "t^6*(t^2 + 3)")
    F = E.field
    assert E.text(E.scale) == "t"
    assert E.A == parse_poly("t + 1", F) and E.B == parse_poly("t^2 + 3", F)
    E2 = make_curve(5, "t + 1", "t^2 + 3")
    assert E.as_dict()["bad_places"] == E2.as_dict()["bad_places"]


@pytest.mark.parametrize("q,A,B", [(5, "t", "t^2 + 1"), (5, "3*t^4 + t", "t^6 + 2"), (7, "t^3 + 2", "t^5 + t + 3"),
                                   (25, "z*t + 1", "t^2 + z"), (11, "t^5 + 3*t", "t^7 + 2*t^2 + 1")])
def test_minimal_discriminant_degree_and_conductor(q, A, B):
    E = make_curve(q, A, B)
    assert E.minimal_disc_degree == 12 * E.k_inf
    assert E.conductor_degree == sum(b.degree * (1 if b.reduction.endswith("multiplicative") else 2)
                                     for b in E.bad_places)
    for b in E.bad_places:
        kind = b.reduction
        assert (b.a_v == 0) == (kind == "additive")


def test_kodaira_table():
    # Tate's algorithm table for p >= 5 (J. Number Theory 44 (1993))
    assert kodaira_type(0, 0, 3)[:2] == ("I3", "multiplicative")
    assert kodaira_type(1, 1, 2)[0] == "II"
    assert kodaira_type(1, 2, 3)[0] == "III"
    assert kodaira_type(2, 2, 4)[0] == "IV"
    assert kodaira_type(2, 3, 6)[0] == "I0*"
    assert kodaira_type(2, 3, 9)[0] == "I3*"
    assert kodaira_type(3, 4, 8)[0] == "IV*"
    assert kodaira_type(3, 5, 9)[0] == "III*"
    assert kodaira_type(4, 5, 10)[0] == "II*"


@pytest.mark.parametrize("q,A,B", [(5, "t", "t^2 + 1"), (7, "t^3 + 2", "t^5 + t + 3"), (5, "3*t^4 + t", "t^6 + 2"),
                                   (13, "t^2 + 5", "t^3 + 7*t + 1")])
def test_split_test_agrees_with_character_sum(q, A, B):
    # Euler's criterion on 6B mod P against -sum chi(x^3 + A x + B) at a root of P
    E = make_curve(q, A, B)
    F = E.field
    for b in E.bad_places:
        if b.place == "infinity" or b.degree > 4:
            continue
        P = parse_poly(b.place, F)
        d = degree_data(E, b.degree)
        T = d.table
        from certify.curves.traces import poly_codes_in
        vals = T.evaluate(poly_codes_in(P, F, F.k * b.degree), d.theta)
        idx = np.nonzero(vals == 0)[0]
        assert len(idx) == 1
        assert int(d.traces[idx[0]]) == b.a_v
    # infinity: a_inf from the model at s = 0
    for b in E.bad_places:
        if b.place == "infinity":
            assert degree_data(E, 1).trace_inf == b.a_v


def test_bad_places_cover_the_discriminant():
    E = make_curve(7, "t^3 + 2", "t^5 + t + 3")
    F = finite_field(7)
    prod = F.one_poly()
    for b in E.bad_places:
        if b.place != "infinity":
            prod = prod * parse_poly(b.place, F) ** b.v_disc
    assert prod == E.disc_poly.monic()
