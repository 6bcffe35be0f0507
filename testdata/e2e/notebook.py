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
# nbclient records language_info from kernel_info: a headless `nutate run`
# stores the same, so a front end opening its notebook finds nothing to change.
if os.environ.get("NUTATE_BIN"):
    import json
    import subprocess
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "h.ipynb")
        nbformat.write(nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell("print 1 kHz in uT")]), path)
        subprocess.run([os.environ["NUTATE_BIN"], "run", path], check=True, capture_output=True)
        with open(path) as f:
            stored = json.load(f)["metadata"]["language_info"]
    check(stored == dict(nb.metadata["language_info"]),
          "language_info: nutate run stores %r, the kernel reports %r" % (stored, dict(nb.metadata["language_info"])))
    ok("headless_language_info_equals_kernel")

# A cell long enough to show a progress display, after and before results:
# the progress line leaves no output behind in the notebook nbclient saves.
long_nb = nbformat.v4.new_notebook(cells=[
    nbformat.v4.new_code_cell("pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)"),
    nbformat.v4.new_code_cell("print 1 kHz in uT\nsweep p over offset -20 kHz to 20 kHz points 20000 show mz\nprint 2 kHz in uT"),
])
long_nb.metadata["kernelspec"] = {"name": "nutate", "display_name": "Nutate (RF pulses)", "language": "nutate"}


class Recording(NotebookClient):
    """Counts the progress messages (displays with a display id) it handles."""
    progress_msgs = 0

    def process_message(self, msg, cell, cell_index):
        if msg["content"].get("transient", {}).get("display_id"):
            Recording.progress_msgs += 1
        return super().process_message(msg, cell, cell_index)


Recording(long_nb, timeout=120, kernel_name="nutate", resources={"metadata": {"path": here}}).execute()
check(Recording.progress_msgs > 0, "progress cell: no progress display was sent (the sweep is too short to test)")
outs = long_nb.cells[1].outputs
kinds = [sorted(o.get("data", {})) for o in outs]
# the print, the sweep's figure and its table, the second print
check(len(outs) == 4, "progress cell: nbclient stored %d outputs %r, want 4 results" % (len(outs), kinds))
check("image/svg+xml" in outs[1].get("data", {}), "progress cell: output 2 is not the figure %r" % kinds)
for o in outs:
    text = o.get("data", {}).get("text/plain", "")
    check(o.output_type == "display_data" and "".join(text).strip(), "progress cell: empty or odd output %r" % o)
check("µT" in "".join(outs[0].data["text/plain"]) and "µT" in "".join(outs[3].data["text/plain"]),
      "progress cell: results out of order %r" % kinds)
ok("nbclient_progress_leaves_nothing (%d outputs after %d progress messages)" % (len(outs), Recording.progress_msgs))
