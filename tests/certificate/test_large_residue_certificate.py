"""A residue race of a modulus above 2000 (built from the factorisation of q, no class
weights stored) writes a certificate that the schema accepts and `verify` re-checks."""

import json

import jsonschema
import pytest

from certify.certificate.schema import load_schema
from certify.cli import main


@pytest.mark.slow
def test_structure_residue_certificate_validates_and_verifies(tmp_path, capsys):
    out = tmp_path / "r.json"
    # 2005 = 5 * 401: three real characters (conductors 5, 401, 2005), mean 4
    assert main(["residues", "2005", "--digits", "4", "--json", str(out), "--no-progress"]) == 0
    d = json.loads(out.read_text())
    jsonschema.Draft202012Validator(load_schema()).validate(d)
    assert d["question"]["weights"] == [] and d["question"]["modulus"] == 2005
    assert main(["verify", str(out), "--no-progress"]) == 0
    # one class weight alone is no residue race: the schema refuses it
    d["question"]["weights"] = [{"class": 1, "weight": "-1"}]
    try:
        jsonschema.Draft202012Validator(load_schema()).validate(d)
    except jsonschema.ValidationError:
        pass
    else:
        raise AssertionError("a residue race with a single weight passed the schema")
