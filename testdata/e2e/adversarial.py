"""Hostile traffic against a running kernel, driven with python3-zmq and raw
TCP: wrong and replayed signatures, malformed frames, an idle TCP connection
to every port, frame headers claiming 1 TiB, and an iopub subscriber that never
reads while another client completes 500 cells. After each, the kernel must
keep serving."""

import socket
import struct
import time

import zmq
from jupyter_client.session import Session

from e2elib import check, figure, kernel_pid, ok, rss_kib, run, start

km, kc, _ = start()
info = km.get_connection_info()
key = info["key"] if isinstance(info["key"], bytes) else info["key"].encode()
ip = info["ip"]
ports = {name: info[name + "_port"] for name in ("shell", "iopub", "stdin", "control", "hb")}
ctx = zmq.Context()
good = Session(key=key, signature_scheme=info["signature_scheme"])
bad = Session(key=b"not-the-key", signature_scheme=info["signature_scheme"])


def dealer(port):
    s = ctx.socket(zmq.DEALER)
    s.setsockopt(zmq.LINGER, 0)
    s.connect("tcp://%s:%d" % (ip, port))
    return s


def recv_reply(sock, timeout=10):
    if not sock.poll(timeout * 1000):
        return None
    idents, msg = good.feed_identities(sock.recv_multipart())
    return good.deserialize(msg)


def alive(what):
    """The kernel still answers on shell, control and heartbeat."""
    r, _ = run(kc, "print 1 kHz in uT", timeout=20)
    check(r["status"] == "ok", "%s: shell no longer serves: %r" % (what, r))
    check(kc.is_alive(), "%s: heartbeat lost" % what)
    check(km.is_alive(), "%s: kernel process died" % what)


shell = dealer(ports["shell"])

# Wrong signature, then a good request: only the good one is answered.
m = bad.msg("kernel_info_request")
bad.send(shell, m)
m_ok = good.msg("kernel_info_request")
good.send(shell, m_ok)
r = recv_reply(shell)
check(r is not None and r["parent_header"]["msg_id"] == m_ok["header"]["msg_id"],
      "wrong signature: first reply answers %r" % (r and r["parent_header"].get("msg_id")))
ok("wrong_signature_dropped")

# Missing signature (empty frame) with a key set.
frames = good.serialize(good.msg("kernel_info_request"))
i = frames.index(b"<IDS|MSG>")
frames[i + 1] = b""
shell.send_multipart(frames)

# Replay: the exact frames of an answered request, sent again.
replayed = good.serialize(good.msg("kernel_info_request", content={}))
shell.send_multipart(replayed)
r = recv_reply(shell)
check(r is not None, "first copy of the replayed request got no reply")
first_id = r["parent_header"]["msg_id"]
shell.send_multipart(replayed)
m2 = good.msg("kernel_info_request")
good.send(shell, m2)
r = recv_reply(shell)
check(r is not None and r["parent_header"]["msg_id"] == m2["header"]["msg_id"],
      "replay: reply answers %r, want the fresh request" % (r and r["parent_header"].get("msg_id")))
check(first_id != m2["header"]["msg_id"], "replay test is confused")
ok("replayed_signature_dropped")

# Malformed frames: no delimiter, too few frames, bad JSON under a valid
# signature, a huge number of frames, binary noise.
shell.send_multipart([b"garbage"])
shell.send_multipart([b"<IDS|MSG>"])
shell.send_multipart([b"<IDS|MSG>", b"sig", b"{}"])
hdr = b"{not json"
sig = good.sign([hdr, b"{}", b"{}", b"{}"])
shell.send_multipart([b"<IDS|MSG>", sig, hdr, b"{}", b"{}", b"{}"])
shell.send_multipart([b"x"] * 5000)
shell.send_multipart([bytes(range(256)) * 40])
alive("malformed frames")
ok("malformed_frames_dropped")

# An idle TCP connection to every port, kept open for the rest of the script.
idle = []
for name, port in ports.items():
    idle.append(socket.create_connection((ip, port)))
alive("idle TCP connections")
ok("idle_tcp_connections")


def zmtp_handshake(port, socket_type=b"DEALER"):
    """A raw ZMTP 3.0 NULL handshake (rfc.zeromq.org/spec/23) on a new TCP
    connection; returns the socket ready for frames."""
    s = socket.create_connection((ip, port))
    s.settimeout(10)
    greet = b"\xff" + b"\0" * 8 + b"\x7f" + b"\x03\x00" + b"NULL".ljust(20, b"\0") + b"\0" + b"\0" * 31
    s.sendall(greet)
    got = b""
    while len(got) < 64:
        chunk = s.recv(64 - len(got))
        check(chunk, "handshake: kernel closed during greeting")
        got += chunk
    prop = b"\x0bSocket-Type" + struct.pack(">I", len(socket_type)) + socket_type
    body = b"\x05READY" + prop
    s.sendall(bytes([0x04, len(body)]) + body)
    return s


# Frame headers claiming 1 TiB: after the handshake on each ROUTER port, and
# during the handshake (right after the greeting) on iopub.
for name in ("shell", "control", "stdin"):
    s = zmtp_handshake(ports[name])
    s.sendall(bytes([0x02]) + struct.pack(">Q", 1 << 40))
    # Drain the kernel's READY, then expect the close.
    deadline = time.time() + 10
    closed = False
    while time.time() < deadline and not closed:
        try:
            data = s.recv(1 << 16)
        except ConnectionResetError:
            closed = True
            break
        closed = data == b""
    check(closed, "%s: connection with a 1 TiB frame header left open" % name)
    s.close()
s = socket.create_connection((ip, ports["iopub"]))
s.sendall(b"\xff" + b"\0" * 8 + b"\x7f" + b"\x03\x00" + b"NULL".ljust(20, b"\0") + b"\0" * 32)
s.sendall(bytes([0x04 | 0x02]) + struct.pack(">Q", 1 << 40))
s.close()
alive("1 TiB frame headers")
rss = rss_kib(kernel_pid(km))
check(rss < 200 * 1024, "RSS after 1 TiB headers: %d KiB" % rss)
ok("huge_frame_header_refused")

# A subscriber that never reads, with tiny buffers so it stalls at once, while
# this client completes 500 cells with SVG output.
stuck = ctx.socket(zmq.SUB)
stuck.setsockopt(zmq.RCVHWM, 1)
stuck.setsockopt(zmq.RCVBUF, 4096)
stuck.setsockopt(zmq.SUBSCRIBE, b"")
stuck.connect("tcp://%s:%d" % (ip, ports["iopub"]))
r, _ = run(kc, "pulse hard = rect(duration = 200 us, flip = 90 deg)")
check(r["status"] == "ok", "pulse: %r" % r)
times = []
t0 = time.perf_counter()
for i in range(500):
    t = time.perf_counter()
    r, outs = run(kc, "sweep hard over offset -5 kHz to 5 kHz points 101", timeout=30)
    times.append(time.perf_counter() - t)
    check(r["status"] == "ok", "cell %d: %r" % (i, r))
    check(any("image/svg+xml" in m["content"].get("data", {}) for m in outs), "cell %d: no SVG reached this client" % i)
total = time.perf_counter() - t0
times.sort()
figure("cells_500_with_stuck_subscriber_total", total, "s")
figure("cell_median_with_stuck_subscriber", times[len(times) // 2] * 1000, "ms")
figure("cell_max_with_stuck_subscriber", times[-1] * 1000, "ms")
check(times[-1] < 5, "a cell took %.1f s while a subscriber was stuck" % times[-1])
alive("stuck subscriber")
ok("stuck_subscriber_isolated")

# ZMTP heartbeats (libzmq sends PING commands when HEARTBEAT_IVL is set): a
# subscriber and a shell client that ping every 2 ms get every message intact,
# and are never dropped for missing PONGs.
hb_sub = ctx.socket(zmq.SUB)
hb_sub.setsockopt(zmq.HEARTBEAT_IVL, 2)
hb_sub.setsockopt(zmq.HEARTBEAT_TIMEOUT, 1000)
hb_sub.setsockopt(zmq.SUBSCRIBE, b"")
hb_sub.connect("tcp://%s:%d" % (ip, ports["iopub"]))
hb_shell = ctx.socket(zmq.DEALER)
hb_shell.setsockopt(zmq.HEARTBEAT_IVL, 2)
hb_shell.setsockopt(zmq.HEARTBEAT_TIMEOUT, 1000)
hb_shell.setsockopt(zmq.LINGER, 0)
hb_shell.connect("tcp://%s:%d" % (ip, ports["shell"]))
# Wait until the subscriber receives: the first request's busy proves it joined.
while True:
    m = good.msg("kernel_info_request")
    good.send(hb_shell, m)
    check(recv_reply(hb_shell) is not None, "heartbeat client: no kernel_info reply")
    if hb_sub.poll(500):
        break
while hb_sub.poll(200):
    hb_sub.recv_multipart()
cells = 100
ids = set()
for i in range(cells):
    m = good.msg("execute_request", content={"code": "sweep hard over offset -5 kHz to 5 kHz points 101", "silent": False,
                                             "store_history": True, "user_expressions": {}, "allow_stdin": False})
    ids.add(m["header"]["msg_id"])
    good.send(hb_shell, m)
    r = recv_reply(hb_shell, timeout=30)
    check(r is not None and r["content"]["status"] == "ok", "heartbeat client: cell %d reply %r" % (i, r and r["content"]))
idle_seen = set()
while len(idle_seen) < cells and hb_sub.poll(10000):
    _, msg = good.feed_identities(hb_sub.recv_multipart())
    m = good.deserialize(msg)  # raises on a broken message
    if m["msg_type"] == "status" and m["content"]["execution_state"] == "idle":
        idle_seen.add(m["parent_header"].get("msg_id"))
check(ids <= idle_seen, "heartbeat subscriber: saw %d of %d idle statuses" % (len(ids & idle_seen), cells))
hb_sub.close(linger=0)
hb_shell.close()
alive("ZMTP heartbeats")
ok("zmtp_heartbeat_pings")

stuck.close()
for s in idle:
    s.close()
shell.close()
ctx.term()
kc.stop_channels()
km.shutdown_kernel(now=False)
ok("shutdown_after_abuse")
