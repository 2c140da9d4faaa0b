"""Shared by the reference scripts: where a generated reference document goes (the file named by --out, or
standard output for "-"), so every script writes its JSON the same way.

Deliberately not here: what the document holds (each script builds its own). Cost: one json.dumps.
"""
import json
import sys


def write_reference(doc, out, indent=None):
    """`doc` as JSON to standard output when `out` is "-", else to the file `out` with a final newline."""
    text = json.dumps(doc, indent=indent)
    if out == "-":
        sys.stdout.write(text)
    else:
        with open(out, "w") as f:
            f.write(text + "\n")
