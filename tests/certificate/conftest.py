"""Certificates computed once per test session (each takes about a second)."""

import pytest

from certify.certificate.build import certify_with_certificate
from certify.race.question import residue_race, two_way, weighted


@pytest.fixture(scope="session")
def cert_4_3_1():
    """delta(4;3,1) to 12 digits: (result, certificate)."""
    return certify_with_certificate(two_way(4, 3, 1), 12)


@pytest.fixture(scope="session")
def more_certs():
    """Certificates of other race kinds: a complex character pair, residues, weighted."""
    return [certify_with_certificate(q, 8)[1]
            for q in (two_way(5, 2, 1), residue_race(8), weighted(5, {1: 1, 4: 1, 2: -1, 3: -1}))]
