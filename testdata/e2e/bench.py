"""Figures for the kernel under real clients (printed, not asserted):
start to ready, execute round trip of a cell drawing a 601-point profile,
interrupt latency is in client.py; idle RSS and idle CPU here."""

import json
import os
import statistics
import subprocess
import tempfile
import time

import zmq
from jupyter_client.session import Session

from e2elib import figure, kernel_pid, ok, rss_kib, run, start, stop

# 1. Start to ready as jupyter_client sees it (start_kernel + wait_for_ready;
# wait_for_ready always ends with 0.2 s of iopub silence), over 11 starts; the
# first start of a process pays for jupyter_client's own imports and is left out.
readies = []
for i in range(12):
    km, kc, t = start()
    readies.append(t)
    if i < 11:
        stop(km, kc)
readies = readies[1:]
figure("start_to_ready_jupyter_client_median", statistics.median(readies), "s")
figure("start_to_ready_jupyter_client_slowest", max(readies), "s")

# 2. Process start to first kernel_info_reply with a client that retries its
# connection every 5 ms (the kernel's own part of readiness).
binary = json.load(open(km.kernel_spec.resource_dir + "/kernel.json"))["argv"][0]
ctx = zmq.Context()
firsts = []
for i in range(5):
    with tempfile.TemporaryDirectory() as d:
        cf = os.path.join(d, "conn.json")
        ports = {}
        for n in ("shell", "iopub", "stdin", "control", "hb"):
            s = ctx.socket(zmq.REP)
            ports[n + "_port"] = s.bind_to_random_port("tcp://127.0.0.1")
            s.close(linger=0)
        info = dict(ports, ip="127.0.0.1", transport="tcp", key="bench", signature_scheme="hmac-sha256")
        json.dump(info, open(cf, "w"))
        session = Session(key=b"bench")
        sock = ctx.socket(zmq.DEALER)
        sock.setsockopt(zmq.RECONNECT_IVL, 5)
        sock.setsockopt(zmq.LINGER, 0)
        t0 = time.perf_counter()
        p = subprocess.Popen([binary, "kernel", "--connection-file", cf])
        sock.connect("tcp://127.0.0.1:%d" % info["shell_port"])
        session.send(sock, session.msg("kernel_info_request"))
        # The kernel holds its first request until an iopub subscriber joins
        # (500 ms at most); subscribe like a client does.
        sub = ctx.socket(zmq.SUB)
        sub.setsockopt(zmq.RECONNECT_IVL, 5)
        sub.setsockopt(zmq.SUBSCRIBE, b"")
        sub.connect("tcp://127.0.0.1:%d" % info["iopub_port"])
        sock.poll(10000)
        sock.recv_multipart()
        firsts.append(time.perf_counter() - t0)
        sock.close()
        sub.close(linger=0)
        p.terminate()
        p.wait()
figure("exec_to_kernel_info_reply_median", statistics.median(firsts) * 1000, "ms")

# 3. Idle RSS and CPU of a fresh kernel (the last one started above).
pid = kernel_pid(km)
time.sleep(1)
figure("idle_rss_fresh", rss_kib(pid) / 1024, "MiB")

# 4. Execute round trip of a cell drawing a 601-point profile.
r, _ = run(kc, "pulse hard = rect(duration = 200 us, flip = 90 deg)")
assert r["status"] == "ok", r
times = []
size = 0
for i in range(120):
    t = time.perf_counter()
    r, outs = run(kc, "sweep hard over offset -5 kHz to 5 kHz points 601")
    times.append(time.perf_counter() - t)
    assert r["status"] == "ok", r
    size = sum(len(json.dumps(m["content"])) for m in outs)
times = times[20:]  # warm-up
times.sort()
figure("execute_601_point_profile_median", statistics.median(times) * 1000, "ms")
figure("execute_601_point_profile_p95", times[int(0.95 * len(times))] * 1000, "ms")
figure("execute_601_point_profile_output", size / 1024, "KiB")
figure("rss_after_120_cells", rss_kib(pid) / 1024, "MiB")


def cpu_ticks(pid):
    with open("/proc/%d/stat" % pid) as f:
        fields = f.read().rsplit(")", 1)[1].split()
    return int(fields[11]) + int(fields[12])  # utime + stime


c0 = cpu_ticks(pid)
time.sleep(3)
idle_cpu = (cpu_ticks(pid) - c0) / os.sysconf("SC_CLK_TCK") / 3 * 100
figure("idle_cpu", idle_cpu, "%")
stop(km, kc)
ctx.term()
ok("bench")
