"""Exact storage of primitive spectra: balls as decimal strings, floats as repr.

A :class:`~certify.spectrum.spectrum.PrimitiveSpectrum` is written as a
JSON document in which every ball is a pair of exact decimal strings
(midpoint, radius; :func:`certify.arith.ball_strings`) and every float
(heights, widths, bracket ends) is its shortest ``repr``, which Python reads
back to the same double.  Reading rebuilds balls that contain the stored ones
(:func:`certify.arith.ball_from_strings`), so nothing certified is lost or
narrowed on the way through the cache.  Complex balls (L(1/2, chi)) are
stored as their real and imaginary parts.

The document is compressed with zlib and protected by a SHA-256 digest, so a
damaged entry is detected on reading instead of being trusted.
"""

from __future__ import annotations

import hashlib
import json
import zlib

from ..arith import acb, ball_from_strings, ball_strings
from ..errors import BadInput
from ..spectrum.spectrum import PrimitiveSpectrum
from ..spectrum.zeros import ZeroList

FORMAT = 1


def _ball(x) -> list[str]:
    return list(ball_strings(x))


def _unball(pair) -> object:
    mid, rad = pair
    return ball_from_strings(str(mid), str(rad))


def spectrum_to_dict(sp: PrimitiveSpectrum) -> dict:
    """A JSON-ready dictionary holding ``sp`` exactly."""
    zl = sp.zeros
    return {
        "format": FORMAT,
        "conductor": sp.conductor,
        "label": sp.label,
        "parity": sp.parity,
        "zeros": {
            "height": float(zl.height),
            "width": float(zl.width),
            "z_calls": int(zl.z_calls),
            "grid_fraction": float(zl.grid_fraction),
            "balls": [_ball(z) for z in zl.zeros],
            "brackets": [[float(a), float(b), int(s)] for (a, b, s) in zl.brackets],
        },
        "power_sums": [_ball(s) for s in sp.power_sums],
        "power_sum_bits": int(sp.power_sum_bits),
        "central": [_ball(sp.central.real), _ball(sp.central.imag)],
    }


def spectrum_from_dict(d: dict) -> PrimitiveSpectrum:
    """Inverse of :func:`spectrum_to_dict` (balls contain the stored ones)."""
    try:
        if d.get("format") != FORMAT:
            raise BadInput(f"unknown spectrum format {d.get('format')!r} (expected {FORMAT})")
        z = d["zeros"]
        zl = ZeroList(int(d["conductor"]), int(d["label"]), float(z["height"]),
                      [_unball(p) for p in z["balls"]],
                      [(float(a), float(b), int(s)) for a, b, s in z["brackets"]],
                      float(z["width"]), int(z["z_calls"]), float(z["grid_fraction"]))
        re, im = d["central"]
        central = acb(_unball(re), _unball(im))
        return PrimitiveSpectrum(int(d["conductor"]), int(d["label"]), int(d["parity"]), zl,
                                 [_unball(p) for p in d["power_sums"]],
                                 int(d["power_sum_bits"]), central)
    except (KeyError, TypeError, ValueError) as exc:
        raise BadInput(f"malformed stored spectrum: {exc}") from None


def encode(sp: PrimitiveSpectrum) -> tuple[bytes, str]:
    """(compressed blob, sha256 hex digest of the blob)."""
    text = json.dumps(spectrum_to_dict(sp), separators=(",", ":"), sort_keys=True)
    blob = zlib.compress(text.encode("utf-8"), 6)
    return blob, hashlib.sha256(blob).hexdigest()


def decode(blob: bytes, digest: str | None = None) -> PrimitiveSpectrum:
    """Rebuild a spectrum from :func:`encode`'s blob, checking the digest if given."""
    if digest is not None and hashlib.sha256(blob).hexdigest() != digest:
        raise BadInput("stored spectrum fails its checksum (damaged entry)")
    try:
        text = zlib.decompress(blob).decode("utf-8")
        d = json.loads(text)
    except (zlib.error, UnicodeDecodeError, ValueError) as exc:
        raise BadInput(f"stored spectrum cannot be read: {exc}") from None
    return spectrum_from_dict(d)
