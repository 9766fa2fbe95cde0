#!/usr/bin/env python3
"""json_check.py - every command's --format json against its JSON Schema.

Usage: json_check.py LAMPWICK SOURCE_ROOT

Runs each command that prints results with --format json on every bundled
profile (or the example measurements), and checks each document:
- it is one JSON text (RFC 8259), parsed with no duplicate keys;
- it validates against docs/schema/COMMAND.schema.json (JSON Schema draft
  2020-12, validated by the python3-jsonschema package);
- its numbers are CSV's: `run --format json` and `run --format csv` give
  the same value in every column, to the last bit;
- the schemas can fail: documents with a column removed, a number turned
  into text or the command renamed are refused.
"""
import copy
import csv
import io
import json
import pathlib
import subprocess
import sys

import jsonschema

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
from checklib import count, fail, finish  # noqa: E402

LW, ROOT = sys.argv[1], pathlib.Path(sys.argv[2])
SCHEMAS = ROOT / "docs" / "schema"



def no_duplicates(pairs):
    keys = [k for k, _ in pairs]
    if len(keys) != len(set(keys)):
        raise ValueError("duplicate keys: %r" % keys)
    return dict(pairs)


def schema_for(command):
    with open(SCHEMAS / (command.replace(" ", "-") + ".schema.json")) as f:
        return json.load(f)


with open(SCHEMAS / "document.schema.json") as f:
    BASE = json.load(f)
STORE = {BASE["$id"]: BASE}


def validator(schema):
    resolver = jsonschema.RefResolver(schema["$id"], schema, store=STORE)
    cls = jsonschema.validators.validator_for(schema)
    cls.check_schema(schema)
    return cls(schema, resolver=resolver)


def lampwick(args, expect_rc=0):
    p = subprocess.run([LW] + args, capture_output=True, text=True, timeout=600)
    if p.returncode != expect_rc:
        fail("%s: exit %d, expected %d: %s" % (" ".join(args), p.returncode, expect_rc,
                                               p.stderr.strip()))
        return None
    return p.stdout


def validate(command, args):
    """Run, parse and validate; return the document (None on failure)."""
    out = lampwick(args + ["--format", "json"])
    if out is None:
        return None
    count()
    try:
        doc = json.loads(out, object_pairs_hook=no_duplicates)
    except ValueError as e:
        fail("%s: not one JSON document: %s" % (" ".join(args), e))
        return None
    errors = sorted(validator(schema_for(command)).iter_errors(doc), key=str)
    for e in errors[:5]:
        fail("%s: %s at %s" % (" ".join(args), e.message, list(e.absolute_path)))
    return doc


profiles = sorted((ROOT / "profiles").glob("*.ini"))
docs = {}
for p in profiles:
    prof = str(p)
    docs[("run", p.name)] = validate("run", ["run", prof])
    validate("table", ["table", prof])
    validate("sweep", ["sweep", prof, "--vary", "pack.ambient_c=0,20"])
    validate("spread", ["spread", prof, "--samples", "64"])
    # two cells in series overdrive the headlamp's LED into thermal runaway,
    # which size refuses outright (a known limit, DEVELOPERS.md)
    extra = ["--max-series", "1"] if p.name == "headlamp-18650.ini" else []
    validate("size", ["size", prof, "--runtime-h", "2"] + extra)
    if "type = converter" not in p.read_text():
        validate("pick", ["pick", prof, "--target-ma", "10"])
validate("cells", ["cells"])
validate("fit led", ["fit", "led", str(ROOT / "docs" / "examples" / "white-led-bench.csv")])
validate("spread", ["spread", str(ROOT / "profiles" / "demo.ini"), "--samples", "64",
                 "--target", "runtime_h>=55", "--sampling", "sobol"])

# the numbers are CSV's, bit for bit
for p in profiles:
    doc = docs.get(("run", p.name))
    out = lampwick(["run", str(p), "--format", "csv"])
    if not doc or out is None:
        continue
    row = next(csv.DictReader(io.StringIO(out)))
    jrow = doc["tables"][0]["rows"][0]
    for k, text in row.items():
        count()
        v = jrow.get(k, "missing")
        if text == "":
            ok = v is None
        elif isinstance(v, str):
            ok = v == text
        else:
            ok = isinstance(v, (int, float)) and float(text) == v
        if not ok:
            fail("%s: %s is %r in CSV but %r in JSON" % (p.name, k, text, v))

# the schemas can fail
demo = docs.get(("run", "demo.ini"))
if demo:
    run_v = validator(schema_for("run"))
    broken = []
    d = copy.deepcopy(demo); del d["tables"][0]["rows"][0]["runtime_h"]; broken.append(("column removed", d))
    d = copy.deepcopy(demo); d["tables"][0]["rows"][0]["runtime_h"] = "60 h"; broken.append(("number as text", d))
    d = copy.deepcopy(demo); d["command"] = "sweep"; broken.append(("command renamed", d))
    d = copy.deepcopy(demo); d["tables"][0]["rows"][0]["extra"] = 1; broken.append(("unknown column", d))
    d = copy.deepcopy(demo); del d["caution"]; broken.append(("no caution", d))
    for what, d in broken:
        count()
        if run_v.is_valid(d):
            fail("the run schema takes a document with its %s" % what)
else:
    fail("no demo run document")

finish()
