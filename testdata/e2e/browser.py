"""A real-browser end-to-end test: Debian's classic Jupyter Notebook (6.4)
served from a temporary directory, driven in headless Chromium by Selenium.

    browser.py NOTEBOOK [NOTEBOOK...]

For each notebook (copied into a fresh server directory, with fresh Jupyter
data and config directories, so it opens untrusted):
- opening it: it is untrusted, the kernel starts, the notebook stays clean
  (its stored language_info is the kernel's own), code is highlighted by the
  kernelspec's kernel.js, no CodeMirror mode file is missing (404), and the
  figures show: the output areas holding a visible <svg> or <img> are as many
  as the stored outputs carrying image/svg+xml;
- running all cells: no error, every code cell numbered, the figures shown;
- completion: Tab after "pulse q = si" gives "sinc";
- interrupting a long cell: it stops with "Interrupted", the session survives,
  and its progress line leaves no output behind.
With NUTATE_HELP_LINK set (a help link of the kernel's form with the front
end's "?v=..." suffix appended, to a local page), the browser must land on
the section the link names.

Prints "ok NAME", "skip NAME: why", "figure NAME VALUE UNIT" or "FAIL why".
"""

import json
import os
import shutil
import socket
import subprocess
import sys
import tempfile
import time
import urllib.request

from selenium import webdriver
from selenium.webdriver.chrome.service import Service
from selenium.webdriver.common.keys import Keys

from e2elib import KERNEL, check, fail, figure, ok, skip

CHROMIUM = os.environ.get("NUTATE_CHROMIUM", "/usr/bin/chromium")
CHROMEDRIVER = os.environ.get("NUTATE_CHROMEDRIVER", "/usr/bin/chromedriver")
NOTEBOOK_SERVER = os.environ.get("NUTATE_NOTEBOOK_SERVER", "/usr/bin/jupyter-notebook")


def free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


on_timeout = None  # gives details for a timeout message


def wait(what, cond, timeout, step=0.1):
    deadline = time.time() + timeout
    while time.time() < deadline:
        v = cond()
        if v:
            return v
        time.sleep(step)
    fail("timed out after %gs waiting for %s" % (timeout, what) + (": " + on_timeout() if on_timeout else ""))


def stored_figures(path):
    """Outputs carrying image/svg+xml, and how many of them also carry text/html."""
    with open(path) as f:
        nb = json.load(f)
    svg = html = 0
    for c in nb["cells"]:
        for o in c.get("outputs", []) if c["cell_type"] == "code" else []:
            data = o.get("data", {})
            if "image/svg+xml" in data:
                svg += 1
                html += "text/html" in data
    return svg, html


COUNT_FIGURES = """
var n = 0;
document.querySelectorAll('#notebook .output_area').forEach(function (a) {
  var els = a.querySelectorAll('svg, img');
  for (var i = 0; i < els.length; i++) {
    var r = els[i].getBoundingClientRect();
    if (r.width > 20 && r.height > 20) { n++; break; }
  }
});
return n;
"""

ALL_RUN = """
var nb = Jupyter.notebook;
if (nb.kernel_busy) return false;
var cells = nb.get_cells().filter(function (c) { return c.cell_type === 'code'; });
return cells.every(function (c) { return typeof c.input_prompt_number === 'number'; });
"""


def main(paths):
    tmp = tempfile.mkdtemp(prefix="nutate-browser-")
    try:
        run(tmp, paths)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)


def run(tmp, paths):
    root = os.path.join(tmp, "nb")
    os.makedirs(root)
    env = dict(os.environ)
    env.update({
        "JUPYTER_DATA_DIR": os.path.join(tmp, "data"),  # a fresh trust database: notebooks open untrusted
        "JUPYTER_CONFIG_DIR": os.path.join(tmp, "config"),
        "JUPYTER_RUNTIME_DIR": os.path.join(tmp, "runtime"),
        "HOME": tmp,
    })
    names = []
    for p in paths:
        shutil.copy(p, root)
        names.append(os.path.basename(p))
    port, token = free_port(), "nutate-browser-test"
    server = subprocess.Popen(
        [NOTEBOOK_SERVER, "--no-browser", "--ip=127.0.0.1", "--port=%d" % port,
         "--NotebookApp.token=" + token, "--NotebookApp.notebook_dir=" + root,
         "--NotebookApp.open_browser=False"] + (["--allow-root"] if os.geteuid() == 0 else []),
        env=env, stdout=subprocess.DEVNULL, stderr=open(os.path.join(tmp, "server.log"), "w"))
    base = "http://127.0.0.1:%d" % port
    global on_timeout

    def server_log():
        with open(os.path.join(tmp, "server.log")) as f:
            return "server log:\n" + f.read()[-3000:]
    on_timeout = server_log

    def up():
        try:
            urllib.request.urlopen(base + "/api/kernelspecs?token=" + token, timeout=2).read()
            return True
        except OSError:
            return False

    opts = webdriver.ChromeOptions()
    opts.binary_location = CHROMIUM
    for a in ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
              "--disable-background-networking", "--disable-component-update", "--disable-sync",
              "--user-data-dir=" + os.path.join(tmp, "chromium"), "--window-size=1280,1000"]:
        opts.add_argument(a)
    opts.set_capability("goog:loggingPrefs", {"browser": "ALL"})
    driver = None
    try:
        wait("the notebook server", up, 60, 0.2)
        specs = json.loads(urllib.request.urlopen(base + "/api/kernelspecs?token=" + token).read())
        check(KERNEL in specs["kernelspecs"], "kernelspec %s not served: %r" % (KERNEL, list(specs["kernelspecs"])))
        check("kernel.js" in specs["kernelspecs"][KERNEL]["resources"],
              "kernelspec resources: got %r, want kernel.js" % specs["kernelspecs"][KERNEL]["resources"])
        driver = webdriver.Chrome(service=Service(CHROMEDRIVER), options=opts)
        driver.set_script_timeout(30)
        link = os.environ.get("NUTATE_HELP_LINK")
        if link:
            help_link(driver, link)
        for i, name in enumerate(names):
            notebook(driver, base, token, name, os.path.join(root, name), interrupt=(i == 0))
    finally:
        if driver is not None:
            driver.quit()
        server.terminate()
        try:
            server.wait(20)
        except subprocess.TimeoutExpired:
            server.kill()


def help_link(driver, link):
    driver.get(link)
    target = driver.execute_script("var t = document.querySelector(':target'); return t ? t.id : null;")
    check(target == "conventions", "help link %s: the browser's :target is %r, want the section 'conventions'" % (link, target))
    ok("help_link_keeps_anchor (%s)" % link.split("#", 1)[1])


def notebook(driver, base, token, name, path, interrupt):
    driver.get("%s/notebooks/%s?token=%s" % (base, name, token))
    wait("the notebook page", lambda: driver.execute_script(
        "return !!(window.Jupyter && Jupyter.notebook && Jupyter.notebook._fully_loaded)"), 60)
    t0 = time.time()
    wait("the kernel", lambda: driver.execute_script(
        "var k = Jupyter.notebook.kernel; return !!(k && k.info_reply && k.info_reply.language_info)"), 60)
    figure("browser_kernel_ready_" + name, time.time() - t0, "s")
    check(driver.execute_script("return Jupyter.notebook.trusted") is False, "%s: opened trusted, want untrusted" % name)
    # Give kernel.js and the mode a moment to apply after kernel_ready.
    wait("highlighted code", lambda: driver.execute_script(
        "return document.querySelectorAll('#notebook .CodeMirror .cm-keyword').length"), 20)
    dirty = driver.execute_script("return Jupyter.notebook.dirty")
    check(dirty is False, "%s: marked unsaved on opening (stored language_info %r, kernel's %r)" % (
        name, driver.execute_script("return Jupyter.notebook.metadata.language_info"),
        driver.execute_script("return Jupyter.notebook.kernel.info_reply.language_info")))
    ok("browser_open_clean " + name)
    kinds = driver.execute_script("""
        var k = {};
        document.querySelectorAll('#notebook .CodeMirror span[class^="cm-"]').forEach(function (s) { k[s.className] = (k[s.className] || 0) + 1; });
        return k;""")
    for style in ("cm-keyword", "cm-builtin", "cm-number", "cm-atom"):
        check(kinds.get(style), "%s: no %s token highlighted (got %r)" % (name, style, kinds))
    ok("browser_highlighting %s (%s)" % (name, ", ".join("%s %d" % (k, v) for k, v in sorted(kinds.items()))))
    # Opening a stored notebook, the page asks for the mode its metadata names
    # before the kernelspec's kernel.js (which defines it) has loaded: at most
    # that one request may miss; once the kernel is ready the mode is found.
    missing = [e["message"] for e in driver.get_log("browser") if "404" in e["message"] and "codemirror" in e["message"]]
    figure("browser_mode_requests_missed_" + name, len(missing), "")
    check(len(missing) <= 1, "%s: CodeMirror files missing: %r" % (name, missing))
    driver.execute_script("Jupyter.notebook.set_codemirror_mode('null')")
    driver.execute_script("Jupyter.notebook.set_codemirror_mode(Jupyter.notebook.kernel.info_reply.language_info.codemirror_mode)")
    time.sleep(0.5)
    missing = [e["message"] for e in driver.get_log("browser") if "404" in e["message"] and "codemirror" in e["message"]]
    check(not missing, "%s: the kernel's codemirror_mode is not found once kernel.js has loaded: %r" % (name, missing))
    ok("browser_mode_found " + name)

    svg, with_html = stored_figures(path)
    shown = driver.execute_script(COUNT_FIGURES)
    figure("browser_untrusted_figures_" + name, shown, "of %d" % svg)
    if with_html:
        skip("browser_untrusted_figures " + name,
             "%d of its %d figure outputs also carry text/html, which the page prefers and sanitizes when untrusted "
             "(figures as image/svg+xml + image/png without text/html are expected)" % (with_html, svg))
    else:
        check(shown == svg, "%s untrusted: %d output areas show a figure, want %d (stored image/svg+xml outputs)" % (name, shown, svg))
        ok("browser_untrusted_figures %s (%d)" % (name, shown))

    t0 = time.time()
    driver.execute_script("Jupyter.notebook.execute_all_cells()")
    wait("all cells to run", lambda: driver.execute_script(ALL_RUN), 600, 0.25)
    figure("browser_run_all_" + name, time.time() - t0, "s")
    errors = driver.execute_script("return document.querySelectorAll('#notebook .output_error').length")
    check(errors == 0, "%s: %d cells failed after run all" % (name, errors))
    run_svg = driver.execute_script("""
        var n = 0;
        Jupyter.notebook.get_cells().forEach(function (c) {
          (c.output_area ? c.output_area.outputs : []).forEach(function (o) { if (o.data && o.data['image/svg+xml']) n++; });
        });
        return n;""")
    shown = driver.execute_script(COUNT_FIGURES)
    check(shown >= run_svg and run_svg > 0, "%s after run all: %d output areas show a figure, want %d" % (name, shown, run_svg))
    empty = driver.execute_script("""
        var n = 0;
        Jupyter.notebook.get_cells().forEach(function (c) {
          (c.output_area ? c.output_area.outputs : []).forEach(function (o) {
            if (o.output_type === 'display_data' && o.data && Object.keys(o.data).length === 1 && String(o.data['text/plain'] || '').trim() === '') n++;
          });
        });
        return n;""")
    check(empty == 0, "%s after run all: %d empty outputs kept" % (name, empty))
    ok("browser_run_all %s (%d figures)" % (name, shown))

    # Completion: Tab after "pulse q = si" completes the only shape, sinc.
    driver.execute_script("""
        var nb = Jupyter.notebook;
        var cell = nb.insert_cell_at_bottom('code');
        nb.select(nb.find_cell_index(cell));
        cell.set_text('pulse q = si');
        cell.focus_editor();
        cell.code_mirror.setCursor({line: 0, ch: 12});""")
    driver.switch_to.active_element.send_keys(Keys.TAB)
    text = wait("completion", lambda: (lambda t: t if t != "pulse q = si" else None)(
        driver.execute_script("return Jupyter.notebook.get_selected_cell().get_text()")), 20)
    check(text == "pulse q = sinc", "completion: got %r, want 'pulse q = sinc'" % text)
    ok("browser_completion")

    if not interrupt:
        return
    driver.execute_script("""
        var nb = Jupyter.notebook;
        var cell = nb.insert_cell_at_bottom('code');
        cell.set_text('pulse long = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)\\n' +
                      'sweep long over offset -20 kHz to 20 kHz points 1000, b1 0.5 to 1.5 points 1000');
        window.nutateLong = cell;
        cell.execute();""")
    wait("the long cell's progress line", lambda: driver.execute_script("""
        var c = window.nutateLong;
        return c.output_area.outputs.some(function (o) { return o.transient !== undefined || (o.data && /%/.test(String(o.data['text/plain']))); });"""), 60)
    t0 = time.time()
    driver.execute_script("Jupyter.notebook.kernel.interrupt()")
    wait("the interrupted cell", lambda: driver.execute_script("""
        var c = window.nutateLong;
        return !Jupyter.notebook.kernel_busy && c.output_area.outputs.some(function (o) { return o.output_type === 'error'; });"""), 60, 0.02)
    figure("browser_interrupt_to_idle", (time.time() - t0) * 1000, "ms")
    outs = driver.execute_script("return window.nutateLong.output_area.outputs.map(function (o) { return [o.output_type, o.ename || '', String((o.data || {})['text/plain'] || '')]; })")
    check(len(outs) == 2 and outs[0][0] == "display_data" and outs[0][2].startswith("pulse long")
          and outs[1][0] == "error" and outs[1][1] == "Interrupted",
          "interrupted cell: outputs %r, want the pulse's summary and the Interrupted error (no progress line left)" % outs)
    driver.execute_script("""
        var cell = Jupyter.notebook.insert_cell_at_bottom('code');
        cell.set_text('sweep long over offset -1 kHz to 1 kHz points 11 show mz');
        window.nutateAfter = cell;
        cell.execute();""")
    wait("a cell after the interrupt", lambda: driver.execute_script("""
        var c = window.nutateAfter;
        return !Jupyter.notebook.kernel_busy && typeof c.input_prompt_number === 'number' && c.output_area.outputs.length > 0;"""), 120, 0.2)
    kinds = driver.execute_script("return window.nutateAfter.output_area.outputs.map(function (o) { return o.output_type; })")
    check("error" not in kinds, "after the interrupt: a sweep of the pulse defined before failed %r" % kinds)
    ok("browser_interrupt")


if __name__ == "__main__":
    if len(sys.argv) < 2:
        fail("usage: browser.py NOTEBOOK...")
    main(sys.argv[1:])
