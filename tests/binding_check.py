#!/usr/bin/env python3
"""binding_check.py - the Python ctypes example against the command line.

Usage: binding_check.py LAMPWICK LIBLAMPWICK.so SOURCE_ROOT

Runs docs/examples/run_light.py (liblampwick's lw_api_run_json through
ctypes) and checks, for every bundled profile, that its document is the
one `lampwick run --format json` prints, table for table and number for
number; that --mode and --set reach the run (the runtime moves as the
command line's does); that bad input comes back as an "error" object with
status 2, file and line, and exit status 2; and that the failure document
validates against docs/schema/run.schema.json too.
"""
import json
import os
import pathlib
import subprocess
import sys

import jsonschema

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
from checklib import count, fail, finish  # noqa: E402

LW, LIB, ROOT = sys.argv[1], sys.argv[2], pathlib.Path(sys.argv[3])
EXAMPLE = ROOT / "docs" / "examples" / "run_light.py"
ENV = dict(os.environ, LAMPWICK_CELLS=str(ROOT / "cells"))



def example(args):
    p = subprocess.run([sys.executable, str(EXAMPLE), "--lib", LIB] + args, env=ENV,
                       capture_output=True, text=True, timeout=300)
    return p.returncode, p.stdout, p.stderr


def cli(args):
    p = subprocess.run([LW] + args + ["--format", "json"], env=ENV, capture_output=True,
                       text=True, timeout=300)
    return json.loads(p.stdout) if p.returncode == 0 else None


schemas = ROOT / "docs" / "schema"
base = json.loads((schemas / "document.schema.json").read_text())
run_schema = json.loads((schemas / "run.schema.json").read_text())
validator = jsonschema.Draft202012Validator(
    run_schema, resolver=jsonschema.RefResolver(run_schema["$id"], run_schema,
                                                store={base["$id"]: base}))

for p in sorted((ROOT / "profiles").glob("*.ini")):
    count()
    rc, out, err = example([str(p), "--json"])
    want = cli(["run", str(p)])
    if rc != 0 or want is None:
        fail("%s: example exit %d (%s)" % (p.name, rc, err.strip()))
        continue
    got = json.loads(out)
    if got["tables"] != want["tables"]:
        fail("%s: the library's tables differ from the command line's" % p.name)
    for e in validator.iter_errors(got):
        fail("%s: %s" % (p.name, e.message))

# --set and --mode reach the run, as on the command line
demo = str(ROOT / "profiles" / "demo.ini")
for extra in (["--set", "drive.resistor_ohm=47"], ["--mode", "high"],
              ["--mode", "low", "--set", "pack.ambient_c=0"]):
    count()
    rc, out, _ = example([demo, "--json"] + extra)
    want = cli(["run", demo] + extra)
    plain = cli(["run", demo])
    if rc != 0 or want is None:
        fail("%s: exit %d" % (extra, rc))
        continue
    got = json.loads(out)["tables"][0]["rows"][0]["runtime_h"]
    if got != want["tables"][0]["rows"][0]["runtime_h"]:
        fail("%s: runtime %r, the command line's %r" % (extra, got,
                                                         want["tables"][0]["rows"][0]["runtime_h"]))
    if got == plain["tables"][0]["rows"][0]["runtime_h"]:
        fail("%s: the runtime did not move" % extra)

# the text the example prints carries the runtime
count()
rc, out, _ = example([demo])
rt = cli(["run", demo])["tables"][0]["rows"][0]["runtime_h"]
if rc != 0 or ("%.2f h to cutoff" % rt) not in out:
    fail("example text: %r lacks %.2f h" % (out, rt))

# bad input: an error object, status 2, the file and line named
for args, where in (([str(ROOT / "no-such.ini")], "no-such.ini"),
                    ([demo, "--set", "drive.resistor_ohm=abc"], "--set drive.resistor_ohm"),
                    ([demo, "--mode", "nonesuch"], "")):
    count()
    rc, out, err = example(args + ["--json"])
    doc = json.loads(out) if out.strip() else {}
    e = doc.get("error")
    if rc != 2 or not e or e["status"] != 2 or doc["tables"] or where not in e["file"]:
        fail("%s: exit %d, error %r" % (args, rc, e))
    else:
        for v in validator.iter_errors(doc):
            fail("%s: %s" % (args, v.message))

finish()
