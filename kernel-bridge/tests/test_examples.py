"""The example notebooks (examples/*.ipynb) execute headless from top to bottom through nbclient, a real
kernel with no front end attached: every calculator computes through the headless engine, and the
notebooks' own assertions (Rényi order, the Fawzi–Renner bound, Helstrom's bound by numpy) hold."""
from __future__ import annotations

from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

EXAMPLES = sorted((Path(__file__).resolve().parents[2] / "examples").glob("*.ipynb"))


def test_there_is_an_example_notebook():
    assert EXAMPLES, "examples/ holds no notebook"


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_the_example_runs_headless_top_to_bottom(path: Path):
    nb = nbformat.read(path, as_version=4)
    NotebookClient(nb, timeout=300, kernel_name="python3", resources={"metadata": {"path": str(path.parent)}}).execute()
    errors = [o for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", []) if o.get("output_type") == "error"]
    assert not errors, errors
    text = "".join(o.get("text", "") for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", []) if o.get("output_type") == "stream")
    assert "computed by kernel" in text   # no front end: the kernel computed
    assert "certificate: optimal" in text
