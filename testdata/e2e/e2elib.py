"""Helpers shared by the end-to-end scripts (run by e2e_test.go with
/usr/bin/python3; JUPYTER_PATH points at a temporary kernelspec install).

Each script prints one line per check: "ok NAME", "skip NAME: why" or
"figure NAME VALUE UNIT", and exits non-zero at the first failure."""

import os
import sys
import time

import jupyter_client

KERNEL = os.environ.get("NUTATE_KERNEL_NAME", "nutate")


def ok(name):
    print("ok", name, flush=True)


def skip(name, why):
    print("skip %s: %s" % (name, why), flush=True)


def figure(name, value, unit):
    print("figure %s %.4g %s" % (name, value, unit), flush=True)


def fail(msg):
    print("FAIL", msg, flush=True)
    sys.exit(1)


def check(cond, msg):
    if not cond:
        fail(msg)


def start():
    """Start a kernel and a ready client; return (manager, client, seconds)."""
    km = jupyter_client.KernelManager(kernel_name=KERNEL)
    t0 = time.perf_counter()
    km.start_kernel()
    kc = km.client()
    kc.start_channels()
    kc.wait_for_ready(timeout=30)
    return km, kc, time.perf_counter() - t0


def stop(km, kc):
    kc.stop_channels()
    if km.is_alive():
        km.shutdown_kernel(now=False)


def run(kc, code, timeout=60, **kw):
    """Execute code; return (reply content, [iopub messages of this request])."""
    outs = []
    reply = kc.execute_interactive(code, timeout=timeout, output_hook=outs.append, **kw)
    return reply["content"], outs


def of_type(msgs, *types):
    return [m for m in msgs if m["msg_type"] in types]


def kernel_pid(km):
    return km.provisioner.process.pid


def rss_kib(pid):
    with open("/proc/%d/status" % pid) as f:
        for line in f:
            if line.startswith("VmRSS:"):
                return int(line.split()[1])
    return -1
