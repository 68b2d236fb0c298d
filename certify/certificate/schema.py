"""The JSON Schema of every certify document (file ``certify/data/certify-v2.schema.json``).

One schema, one version, for certificates of every setting and for the ``--json``
reports of every command; :func:`validator` is used at run time by every reader
(jsonschema is a runtime dependency: there is no fallback).
"""

from __future__ import annotations

import json
from functools import lru_cache
from importlib import resources

SCHEMA_FILE = "certify-v2.schema.json"


@lru_cache(maxsize=1)
def load_schema() -> dict:
    """The schema as a dict (read from the installed package data)."""
    text = resources.files("certify").joinpath("data", SCHEMA_FILE).read_text(encoding="utf-8")
    return json.loads(text)


@lru_cache(maxsize=1)
def validator():
    """A compiled draft 2020-12 validator of :func:`load_schema`."""
    import jsonschema

    return jsonschema.Draft202012Validator(load_schema())
