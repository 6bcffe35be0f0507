"""Execute small.ipynb with nbclient (as notebook servers and nbconvert do)
and check every code cell ran without error and the sweep drew an SVG."""

import os

import nbformat
from nbclient import NotebookClient

from e2elib import check, ok

here = os.path.dirname(os.path.abspath(__file__))
nb = nbformat.read(os.path.join(here, "small.ipynb"), as_version=4)
client = NotebookClient(nb, timeout=60, kernel_name="nutate", resources={"metadata": {"path": here}})
client.execute()
code = [c for c in nb.cells if c.cell_type == "code"]
for i, c in enumerate(code):
    check(c.execution_count == i + 1, "cell %d: execution_count %r, want %d" % (i, c.execution_count, i + 1))
    check(all(o.output_type != "error" for o in c.outputs), "cell %d: error output %r" % (i, c.outputs))
    check(c.outputs, "cell %d: no output" % i)
check(any("image/svg+xml" in o.get("data", {}) for o in code[1].outputs), "sweep cell: no SVG output")
ok("nbclient_execute")
check(nb.metadata.get("language_info", {}).get("name") == "nutate", "language_info not recorded: %r" % nb.metadata.get("language_info"))
ok("nbclient_language_info")
