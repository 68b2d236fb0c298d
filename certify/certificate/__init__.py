"""Certificates: the immutable record of a certified density, its evidence and its re-check.

* :mod:`.model` -- the frozen, versioned :class:`Certificate` and its JSON form;
* :mod:`.build` -- a certificate from a race result (with the hypotheses' evidence);
* :mod:`.evidence` -- completeness and simplicity from exact moments, integer-relation search;
* :mod:`.verify` -- independent re-verification from the stored data;
* :mod:`.referee` -- verdicts on claimed values and claims files.
"""

from .model import (SCHEMA_ID, SCHEMA_VERSION, Certificate, read_certificate,
                    write_certificate)

__all__ = ["SCHEMA_ID", "SCHEMA_VERSION", "Certificate", "read_certificate", "write_certificate"]
