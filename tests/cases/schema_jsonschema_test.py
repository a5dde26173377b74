"""The shipped case schema, checked by an independent validator.

Uses Debian's python3-jsonschema (Draft 2020-12 validator):
  * cases/case.schema.json is itself a valid Draft 2020-12 schema;
  * every shipped case (cases/*.json) and tests/malformed/000_valid_minimal.json,
    with their // and /* */ comments stripped, validate against it;
  * catalog files whose fault the schema can express (an unknown field, a wrong
    type, an unknown component type, a misspelt choice, a missing required
    field) are rejected by the schema too, at the same place.
Prints "N passed, M failed" and exits non-zero on any failure.
"""

import glob
import json
import os
import sys

try:
    import jsonschema
except ImportError:  # pragma: no cover - reported as a failure, not a skip
    print("python3-jsonschema is not installed (apt-get install python3-jsonschema)")
    print("0 passed, 1 failed")
    sys.exit(1)

SRC = os.environ.get("LOOPWRIGHT_SOURCE_DIR", os.path.join(os.path.dirname(__file__), "..", ".."))

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tools"))
from tally import check, finish  # noqa: E402
from refcheck import load_case, strip_comments  # noqa: E402


def pointer(path_elems):
    return "".join("/" + str(p).replace("~", "~0").replace("/", "~1") for p in path_elems)


# The stripper itself: comment markers inside strings survive, escapes too.
sample = '{"a": "x // not a comment", "b": "say \\"/* hi */\\"", // gone\n "c": 1 /* gone */}'
check(json.loads(strip_comments(sample)) == {"a": "x // not a comment", "b": 'say "/* hi */"', "c": 1},
      "strip_comments keeps // and /* inside strings")

schema_path = os.path.join(SRC, "cases", "case.schema.json")
with open(schema_path, encoding="utf-8") as f:
    schema = json.load(f)

try:
    jsonschema.Draft202012Validator.check_schema(schema)
    check(True, "schema is a valid Draft 2020-12 schema")
except jsonschema.exceptions.SchemaError as e:
    check(False, "cases/case.schema.json is a valid Draft 2020-12 schema",
          f"{e.message} at {pointer(e.path)} (schema path {pointer(e.schema_path)})")

validator = jsonschema.Draft202012Validator(schema)

valid_files = sorted(p for p in glob.glob(os.path.join(SRC, "cases", "*.json"))
                     if os.path.basename(p) != "case.schema.json")
check(len(valid_files) >= 1, "there is at least one shipped case")
valid_files.append(os.path.join(SRC, "tests", "malformed", "000_valid_minimal.json"))
for path in valid_files:
    name = os.path.relpath(path, SRC)
    try:
        doc = load_case(path)
    except (OSError, ValueError) as e:
        check(False, f"{name} parses once comments are stripped", str(e))
        continue
    errors = sorted(validator.iter_errors(doc), key=lambda e: list(e.path))
    check(not errors, f"{name} validates against the schema",
          "; ".join(f"{pointer(e.path)}: {e.message[:200]}" for e in errors[:5]))

# The loader accepts "notes" (anything) and "description" on every object; the
# schema must accept them as well, so an editor does not flag them.
minimal = load_case(os.path.join(SRC, "tests", "malformed", "000_valid_minimal.json"))
minimal["notes"] = ["free text", {"by": "catalog"}]
minimal["loops"][0]["notes"] = "free text"
minimal["loops"][0]["components"][0]["notes"] = "free text"
try:
    errors = list(validator.iter_errors(minimal))
    check(not errors, "a case with notes validates", "; ".join(e.message[:200] for e in errors[:3]))
except Exception as e:  # a broken subschema makes the validator itself fail
    check(False, "a case with notes validates", f"the validator raised {type(e).__name__}: {e}")

# Catalog files the schema can express, with the place the schema must object
# to (the loader's pointer, or its parent object for a misspelt key, since a
# JSON Schema reports additionalProperties at the object holding the key).
rejected = [
    ("045_unknown_field.json", "/loops/0/nodes/4"),
    ("046_unknown_component_field.json", "/loops/0/components/5"),
    ("047_unknown_top_field.json", ""),
    ("005_string_where_object.json", "/fluids/rig_oil"),
    ("006_number_where_string.json", "/loops/0/fluid"),
    ("007_array_where_object.json", "/loops/0/nodes/5/boundary"),
    ("009_bool_where_quantity.json", "/loops/0/components/4/length"),
    ("044_unknown_type.json", "/loops/0/components/5/type"),
    ("048_choice_misspelt.json", "/loops/0/components/4/friction"),
    ("050_unknown_boundary_kind.json", "/loops/0/nodes/0/boundary/kind"),
    ("052_unknown_fluid_kind.json", "/fluids/rig_oil/kind"),
    ("059_design_unknown_kind.json", "/design/0/kind"),
    ("010_missing_name.json", ""),
    ("054_table_row_width.json", "/loops/1/components/0/curve/1"),
]


def all_errors(errs):
    """Every error, descending into anyOf/allOf/if-then context."""
    for e in errs:
        yield e
        yield from all_errors(e.context)


for fname, where in rejected:
    path = os.path.join(SRC, "tests", "malformed", fname)
    doc = load_case(path)
    errors = list(all_errors(validator.iter_errors(doc)))
    check(bool(errors), f"the schema rejects {fname}")
    places = sorted({pointer(e.absolute_path) for e in errors})
    check(where in places, f"the schema objects to {fname} at {where or '(document)'}",
          "schema errors at: " + ", ".join(places[:8]))

finish()
