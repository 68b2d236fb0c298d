"""The JSON Schema of certificates (file ``certify/data/certificate-v1.schema.json``)."""

from __future__ import annotations

import json
from functools import lru_cache
from importlib import resources

SCHEMA_FILE = "certificate-v1.schema.json"


@lru_cache(maxsize=1)
def load_schema() -> dict:
    """The schema as a dict (read from the installed package data)."""
    text = resources.files("certify").joinpath("data", SCHEMA_FILE).read_text(encoding="utf-8")
    return json.loads(text)
