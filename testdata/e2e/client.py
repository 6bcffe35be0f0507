"""Drive the kernel with jupyter_client's KernelManager and BlockingKernelClient:
kernel_info, execute with SVG, an error cell, execution counts, complete,
inspect, is_complete, history, comm_info, interrupt of a long cell, restart and
shutdown. Checks follow the Jupyter messaging protocol 5.3."""

import time
from queue import Empty

from e2elib import check, figure, kernel_pid, of_type, ok, run, skip, start

km, kc, ready = start()
figure("first_start_to_ready", ready, "s")  # includes jupyter_client's first-use imports

# kernel_info: fields clients read.
kc.kernel_info()
reply = kc.get_shell_msg(timeout=10)
c = reply["content"]
check(reply["msg_type"] == "kernel_info_reply", "kernel_info: got %s" % reply["msg_type"])
check(c["protocol_version"] == "5.3", "protocol_version: got %r" % c["protocol_version"])
check(c["implementation"] == "nutate", "implementation: got %r" % c["implementation"])
li = c["language_info"]
check(li["name"] == "nutate" and li["mimetype"] and li["file_extension"], "language_info: got %r" % li)
check(isinstance(c["help_links"], list) and c["banner"], "banner/help_links: got %r" % c)
check(reply["header"]["version"] == "5.3", "header version: got %r" % reply["header"]["version"])
ok("kernel_info")

# Execute: a pulse, then a sweep that draws an SVG profile.
r, outs = run(kc, "pulse hard = rect(duration = 200 us, flip = 90 deg)")
check(r["status"] == "ok", "pulse cell: got %r" % r)
types = [m["msg_type"] for m in outs]
check(types[0] == "status" and outs[0]["content"]["execution_state"] == "busy", "first iopub: got %r" % types)
check(types[1] == "execute_input", "second iopub: got %r" % types)
check(types[-1] == "status" and outs[-1]["content"]["execution_state"] == "idle", "last iopub: got %r" % types)
count1 = r["execution_count"]
r, outs = run(kc, "sweep hard over offset -5 kHz to 5 kHz points 101")
check(r["status"] == "ok", "sweep cell: got %r" % r)
check(r["execution_count"] == count1 + 1, "execution_count: got %r, want %r" % (r["execution_count"], count1 + 1))
svgs = [m for m in of_type(outs, "display_data", "execute_result") if "image/svg+xml" in m["content"]["data"]]
check(svgs, "sweep: no image/svg+xml among %r" % [list(m["content"].get("data", {})) for m in outs])
check(svgs[0]["content"]["data"]["image/svg+xml"].lstrip().startswith("<"), "svg: not markup")
ok("execute_svg")

# Execution counts: silent and store_history=False do not count.
r, _ = run(kc, "let a = 1 ms", silent=True)
check(r["status"] == "ok", "silent cell: got %r" % r)
r, _ = run(kc, "let b = 2 ms", store_history=False)
r, outs = run(kc, "print a + b")
check(r["execution_count"] == count1 + 2, "execution_count after silent/no-history: got %r, want %r" % (r["execution_count"], count1 + 2))
ok("execution_count")

# An error cell: error on iopub and in the reply, same fields.
r, outs = run(kc, "pulse bad = rect(duration = 3 kHz, flip = 90 deg)")
check(r["status"] == "error", "error cell: got status %r" % r["status"])
errs = of_type(outs, "error")
check(len(errs) == 1, "error cell: got %d error messages" % len(errs))
e = errs[0]["content"]
for k in ("ename", "evalue", "traceback"):
    check(e[k] == r[k], "error %s differs: iopub %r, reply %r" % (k, e[k], r[k]))
check(isinstance(e["traceback"], list) and e["evalue"], "error content: got %r" % e)
check(outs[-1]["content"]["execution_state"] == "idle", "error cell did not go idle")
# The session survives the error.
r, _ = run(kc, "describe hard")
check(r["status"] == "ok", "after error: got %r" % r)
ok("error_cell")

# complete: cursor positions are unicode code points.
code = "# µs\npul"
reply = kc.complete(code, len(code), reply=True, timeout=10)["content"]
check(reply["status"] == "ok" and "pulse" in reply["matches"], "complete: got %r" % reply)
check(reply["cursor_end"] == len(code) and reply["cursor_start"] == len(code) - 3,
      "complete range: got %d..%d, want %d..%d" % (reply["cursor_start"], reply["cursor_end"], len(code) - 3, len(code)))
ok("complete")

reply = kc.inspect("rect", 2, reply=True, timeout=10)["content"]
check(reply["status"] == "ok" and reply["found"] and reply["data"].get("text/plain"), "inspect: got %r" % reply)
ok("inspect")

kc.is_complete("pulse p = rect(duration = 1 ms,")
reply = kc.get_shell_msg(timeout=10)["content"]
check(reply["status"] == "incomplete" and "indent" in reply, "is_complete open paren: got %r" % reply)
kc.is_complete("print 1 kHz in uT")
reply = kc.get_shell_msg(timeout=10)["content"]
check(reply["status"] == "complete", "is_complete complete: got %r" % reply)
ok("is_complete")

reply = kc.history(hist_access_type="tail", n=100, reply=True, timeout=10)["content"]
inputs = [h[2] for h in reply["history"]]
check("describe hard" in inputs and "let a = 1 ms" not in inputs, "history: got %r" % inputs)
ok("history")

reply = kc.comm_info(reply=True, timeout=10)["content"]
check(reply["status"] == "ok" and reply["comms"] == {}, "comm_info: got %r" % reply)
ok("comm_info")

# Interrupt a long cell: the cell replies (error), goes idle, the session survives.
# A long cell: a 1000 × 1000 map of a 4000-sample pulse (4e9 rotation steps).
r, _ = run(kc, "pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)")
check(r["status"] == "ok", "long pulse: got %r" % r)
msg_id = kc.execute("sweep p over offset -20 kHz to 20 kHz points 1000, b1 0.5 to 1.5 points 1000")
# Wait until the cell runs; let it show its progress display and one update
# (for at most 10 s), then interrupt.
progress = []  # (msg_type, display_id) of this cell's displays with a display_id
started = False
deadline = time.time() + 10
while time.time() < deadline:
    try:
        m = kc.get_iopub_msg(timeout=max(0.01, deadline - time.time()))
    except Empty:
        break
    if m["parent_header"].get("msg_id") != msg_id:
        continue
    started = started or m["msg_type"] == "execute_input"
    did = m["content"].get("transient", {}).get("display_id")
    if m["msg_type"] in ("display_data", "update_display_data") and did:
        progress.append((m["msg_type"], did))
        if m["msg_type"] == "update_display_data":
            break
check(started, "long cell never started")
t0 = time.perf_counter()
km.interrupt_kernel()
reply = kc.get_shell_msg(timeout=20)
latency = time.perf_counter() - t0
check(reply["parent_header"]["msg_id"] == msg_id, "interrupt: reply to another request")
check(reply["content"]["status"] == "error" and reply["content"]["ename"] == "Interrupted",
      "interrupted cell: got %r" % reply["content"])
figure("interrupt_to_reply", latency * 1000, "ms")
idle = False
while not idle:
    m = kc.get_iopub_msg(timeout=10)
    idle = m["parent_header"].get("msg_id") == msg_id and m["msg_type"] == "status" and m["content"]["execution_state"] == "idle"
r, _ = run(kc, "describe p")
check(r["status"] == "ok", "after interrupt: got %r" % r)
ok("interrupt")
if progress:
    # For each display id: display_data first, then only update_display_data.
    seen = set()
    for t, did in progress:
        want = "update_display_data" if did in seen else "display_data"
        check(t == want, "progress display %s: got %s, want %s (%r)" % (did, t, want, progress))
        seen.add(did)
    ok("progress_display_updates (%d messages, %d display ids)" % (len(progress), len(seen)))
else:
    skip("progress_display_updates", "the long sweep published no display with a display_id within 10 s")

# Restart: a new process, names forgotten, old process exited by itself.
old = km.provisioner.process
pid0 = kernel_pid(km)
km.restart_kernel(now=False)
kc.wait_for_ready(timeout=30)
check(kernel_pid(km) != pid0, "restart: same pid")
check(old.returncode == 0, "restart: old kernel exit status %r, want 0 (not killed)" % old.returncode)
r, _ = run(kc, "describe hard")
check(r["status"] == "error", "after restart: old name still defined")
r, _ = run(kc, "pulse hard = rect(duration = 200 us, flip = 90 deg)")
check(r["status"] == "ok", "after restart: got %r" % r)
ok("restart")

proc = km.provisioner.process
t0 = time.perf_counter()
kc.stop_channels()
km.shutdown_kernel(now=False)
elapsed = time.perf_counter() - t0
check(proc.returncode == 0, "shutdown: exit status %r, want 0 (not killed)" % proc.returncode)
check(elapsed < 5, "shutdown took %.2f s" % elapsed)
figure("shutdown", elapsed * 1000, "ms")
ok("shutdown")
