"""The error tree of certify.

Every failure a user can meet is one of three kinds, each with a message a
mathematician can act on:

* :class:`BadInput` -- the question is malformed (a = b, a class not coprime
  to the modulus, weights that do not sum to zero, ...).
* :class:`PrecisionExhausted` -- a bound could not be established within the
  precision ceiling; the result is *not certified*.
* :class:`Inconsistent` -- the data contradict themselves (a residual power
  sum is negative, a zero is missing, a moment was perturbed); the engine
  refuses to certify rather than absorb the discrepancy.
"""


class CertifyError(Exception):
    """Base of every error certify raises on purpose."""

    exit_code = 1


class BadInput(CertifyError, ValueError):
    """The question or a file is malformed."""

    exit_code = 2


class PrecisionExhausted(CertifyError):
    """A bound could not be proven at any precision up to the ceiling."""

    exit_code = 3


class Inconsistent(CertifyError):
    """Data fail an exact consistency check; nothing is certified."""

    exit_code = 4
