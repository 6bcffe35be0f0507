package kernel

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"io"
	"log"
	"net"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/go-zeromq/zmq4"
	"github.com/go-zeromq/zmq4/security/null"
)

const testKey = "0123456789abcdef"

// testServer starts a kernel on free ports with the fake executor.
func testServer(t testing.TB) (*Server, chan string) {
	t.Helper()
	joined := make(chan string, 64)
	lg := log.New(io.Discard, "", 0)
	if debugLog {
		lg = log.New(os.Stderr, "kernel: ", log.Lmicroseconds)
	}
	s, err := start(ConnectionInfo{IP: "127.0.0.1", Key: testKey, SignatureScheme: "hmac-sha256"},
		&fakeExec{started: make(chan struct{}, 1)}, lg, joined)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		s.Shutdown()
		<-s.Done()
	})
	return s, joined
}

// dial opens a ZMTP connection of type typ to port, as a client.
func dial(t testing.TB, port int, typ zmq4.SocketType) *zmq4.Conn {
	t.Helper()
	c, err := net.Dial("tcp", "127.0.0.1:"+strconv.Itoa(port))
	if err != nil {
		t.Fatal(err)
	}
	zc, err := zmq4.Open(c, null.Security(), typ, zmq4.SocketIdentity("test"), false, nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { zc.Close() })
	return zc
}

// waitJoin waits until the endpoint named name has accepted a peer. The bound
// only turns a failed handshake into a failure instead of a hang.
func waitJoin(t testing.TB, joined chan string, name string) {
	t.Helper()
	bound := time.NewTimer(time.Minute)
	defer bound.Stop()
	for {
		select {
		case n := <-joined:
			if n == name {
				return
			}
		case <-bound.C:
			t.Fatalf("%s: the kernel never completed the handshake (run with NUTATE_KERNEL_DEBUG=1 to see why)", name)
		}
	}
}

// client signs requests and checks replies like a Jupyter client.
type client struct {
	t      testing.TB
	signer *Signer
}

func newClient(t testing.TB) *client {
	s, _ := NewSigner(testKey, "hmac-sha256")
	return &client{t: t, signer: s}
}

func (c *client) send(conn *zmq4.Conn, msgType, id string, content any) {
	c.t.Helper()
	body, _ := json.Marshal(content)
	h := newHeader(msgType, "client-session")
	h.MsgID = id
	frames, _ := c.signer.Encode(Message{Header: h, Content: body})
	if err := conn.SendMsg(zmq4.NewMsgFrom(frames...)); err != nil {
		c.t.Fatal(err)
	}
}

func (c *client) recv(conn *zmq4.Conn) Message {
	c.t.Helper()
	for {
		msg, err := conn.RecvMsg()
		if err != nil {
			c.t.Fatalf("recv: %v", err)
		}
		if msg.Type == zmq4.CmdMsg {
			continue
		}
		m, err := c.signer.Decode(msg.Frames)
		if err != nil {
			c.t.Fatalf("kernel sent a message that does not verify: %v", err)
		}
		return m
	}
}

func TestServerKernelInfoOverTCP(t *testing.T) {
	s, joined := testServer(t)
	info := s.Info()
	c := newClient(t)
	iopub := dial(t, info.IOPubPort, zmq4.Sub)
	iopub.SendMsg(zmq4.NewMsg([]byte{1})) // subscribe to everything
	waitJoin(t, joined, "iopub")
	shell := dial(t, info.ShellPort, zmq4.Dealer)
	c.send(shell, "kernel_info_request", "ki-1", map[string]any{})
	reply := c.recv(shell)
	if reply.Header.MsgType != "kernel_info_reply" || parentID(reply) != "ki-1" {
		t.Fatalf("reply: got %s to %s", reply.Header.MsgType, parentID(reply))
	}
	if len(reply.Idents) != 0 {
		t.Fatalf("reply idents: got %q, want none (a DEALER sends none)", reply.Idents)
	}
	for _, want := range []string{"busy", "idle"} {
		m := c.recv(iopub)
		if m.Header.MsgType != "status" || field(m, "execution_state") != want || parentID(m) != "ki-1" {
			t.Fatalf("iopub: got %s %v parent %s, want status %s", m.Header.MsgType, content(m), parentID(m), want)
		}
	}
}

func TestServerHeartbeat(t *testing.T) {
	s, _ := testServer(t)
	hb := dial(t, s.Info().HBPort, zmq4.Req)
	// A REQ peer sends an empty delimiter before the body and expects it back.
	ping := zmq4.NewMsgFrom([]byte{}, []byte("ping"))
	if err := hb.SendMsg(ping); err != nil {
		t.Fatal(err)
	}
	got, err := hb.RecvMsg()
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Frames) != 2 || string(got.Frames[1]) != "ping" {
		t.Fatalf("heartbeat echo: got %q", got.Frames)
	}
}

func TestServerRoutingIdentitiesEchoed(t *testing.T) {
	s, _ := testServer(t)
	c := newClient(t)
	shell := dial(t, s.Info().ShellPort, zmq4.Dealer)
	h := newHeader("comm_info_request", "x")
	h.MsgID = "ci"
	frames, _ := c.signer.Encode(Message{Idents: [][]byte{[]byte("hop1"), []byte("hop2")}, Header: h, Content: []byte("{}")})
	shell.SendMsg(zmq4.NewMsgFrom(frames...))
	reply := c.recv(shell)
	if len(reply.Idents) != 2 || string(reply.Idents[0]) != "hop1" || string(reply.Idents[1]) != "hop2" {
		t.Fatalf("idents: got %q, want [hop1 hop2]", reply.Idents)
	}
}

func TestServerDropsBadMessages(t *testing.T) {
	s, _ := testServer(t)
	c := newClient(t)
	shell := dial(t, s.Info().ShellPort, zmq4.Dealer)

	// Wrong key.
	wrong, _ := NewSigner("not the key", "")
	h := newHeader("kernel_info_request", "x")
	h.MsgID = "wrong"
	frames, _ := wrong.Encode(Message{Header: h})
	shell.SendMsg(zmq4.NewMsgFrom(frames...))
	// Malformed: no delimiter, and a delimiter with too few frames.
	shell.SendMsg(zmq4.NewMsgFrom([]byte("garbage")))
	shell.SendMsg(zmq4.NewMsgFrom([]byte("<IDS|MSG>"), []byte("sig")))
	// A good message, then the same frames again (replay).
	h = newHeader("kernel_info_request", "x")
	h.MsgID = "good"
	good, _ := c.signer.Encode(Message{Header: h})
	shell.SendMsg(zmq4.NewMsgFrom(good...))
	shell.SendMsg(zmq4.NewMsgFrom(good...))
	c.send(shell, "kernel_info_request", "after", map[string]any{})

	// Replies come in request order on one connection: the first must answer
	// "good" and the second "after"; the others were dropped.
	for _, want := range []string{"good", "after"} {
		if got := parentID(c.recv(shell)); got != want {
			t.Fatalf("reply to %q, want %q", got, want)
		}
	}
}

// handshakeRaw performs the client side of a ZMTP 3.0 NULL handshake by hand
// on c as a DEALER, leaving c ready for frames.
func handshakeRaw(t *testing.T, c net.Conn) {
	t.Helper()
	greet := make([]byte, 64)
	greet[0], greet[9], greet[10], greet[11] = 0xff, 0x7f, 3, 0
	copy(greet[12:], "NULL")
	c.Write(greet)
	peer := make([]byte, 64)
	if _, err := io.ReadFull(c, peer); err != nil {
		t.Fatalf("greeting: %v", err)
	}
	// READY command with Socket-Type DEALER (ZMTP 3.0, "NULL security mechanism").
	body := append([]byte{5}, "READY"...)
	body = append(body, 11)
	body = append(body, "Socket-Type"...)
	body = binary.BigEndian.AppendUint32(body, 6)
	body = append(body, "DEALER"...)
	c.Write(append([]byte{0x04, byte(len(body))}, body...))
	// Read the kernel's READY: flags, size, body.
	hdr := make([]byte, 2)
	if _, err := io.ReadFull(c, hdr); err != nil {
		t.Fatalf("ready: %v", err)
	}
	io.ReadFull(c, make([]byte, hdr[1]))
}

func TestServerSurvivesHostileConnections(t *testing.T) {
	s, joined := testServer(t)
	info := s.Info()
	ports := map[string]int{"shell": info.ShellPort, "iopub": info.IOPubPort, "stdin": info.StdinPort,
		"control": info.ControlPort, "hb": info.HBPort}
	// An idle TCP connection to every port, never sending a byte.
	for name, port := range ports {
		idle, err := net.Dial("tcp", "127.0.0.1:"+strconv.Itoa(port))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		defer idle.Close()
	}
	// A frame header claiming 1 TiB on the shell, after a valid handshake: the
	// kernel closes that connection instead of allocating.
	raw, err := net.Dial("tcp", "127.0.0.1:"+strconv.Itoa(info.ShellPort))
	if err != nil {
		t.Fatal(err)
	}
	defer raw.Close()
	handshakeRaw(t, raw)
	raw.Write([]byte{0x02, 0, 0, 1, 0, 0, 0, 0, 0})
	raw.SetReadDeadline(time.Now().Add(10 * time.Second)) // a bound for a failing test, not a wait
	if n, err := raw.Read(make([]byte, 1)); err == nil {
		t.Fatalf("connection with a 1 TiB frame header still open (read %d bytes)", n)
	}

	// A normal client is served on every channel meanwhile.
	c := newClient(t)
	iopub := dial(t, info.IOPubPort, zmq4.Sub)
	waitJoin(t, joined, "iopub")
	shell := dial(t, info.ShellPort, zmq4.Dealer)
	control := dial(t, info.ControlPort, zmq4.Dealer)
	c.send(shell, "execute_request", "ex", map[string]any{"code": "hello"})
	if r := c.recv(shell); field(r, "status") != "ok" {
		t.Fatalf("execute after abuse: got %v", content(r))
	}
	c.send(control, "kernel_info_request", "ctl", map[string]any{})
	if r := c.recv(control); r.Header.MsgType != "kernel_info_reply" {
		t.Fatalf("control: got %s", r.Header.MsgType)
	}
	// The iopub subscriber saw the execution's messages in order.
	var seen []string
	for len(seen) < 4 {
		m := c.recv(iopub)
		if parentID(m) == "ex" {
			seen = append(seen, m.Header.MsgType)
		}
	}
	if want := []string{"status", "execute_input", "display_data", "status"}; !equal(seen, want) {
		t.Fatalf("iopub: got %v, want %v", seen, want)
	}
}

func TestServerShutdown(t *testing.T) {
	for _, restart := range []bool{false, true} {
		t.Run("restart="+strconv.FormatBool(restart), func(t *testing.T) {
			s, joined := testServer(t)
			c := newClient(t)
			iopub := dial(t, s.Info().IOPubPort, zmq4.Sub)
			waitJoin(t, joined, "iopub")
			control := dial(t, s.Info().ControlPort, zmq4.Dealer)
			c.send(control, "shutdown_request", "bye", map[string]any{"restart": restart})
			r := c.recv(control)
			if r.Header.MsgType != "shutdown_reply" || field(r, "restart") != restart {
				t.Fatalf("got %s %v", r.Header.MsgType, content(r))
			}
			<-s.Done()
			if s.Restart() != restart {
				t.Fatalf("Restart: got %v, want %v", s.Restart(), restart)
			}
			// Everything published before exit was flushed: busy, shutdown_reply, idle.
			var got []string
			for len(got) < 3 {
				got = append(got, c.recv(iopub).Header.MsgType)
			}
			if want := []string{"status", "shutdown_reply", "status"}; !equal(got, want) {
				t.Fatalf("iopub before exit: got %v, want %v", got, want)
			}
		})
	}
}

func TestServerInterruptOverControl(t *testing.T) {
	s, _ := testServer(t)
	c := newClient(t)
	shell := dial(t, s.Info().ShellPort, zmq4.Dealer)
	control := dial(t, s.Info().ControlPort, zmq4.Dealer)
	c.send(shell, "execute_request", "long", map[string]any{"code": "block"})
	<-s.d.exec.(*fakeExec).started
	c.send(control, "interrupt_request", "int", map[string]any{})
	if r := c.recv(control); r.Header.MsgType != "interrupt_reply" {
		t.Fatalf("control: got %s", r.Header.MsgType)
	}
	r := c.recv(shell)
	if field(r, "status") != "error" || field(r, "ename") != interruptedName {
		t.Fatalf("interrupted cell: got %v", content(r))
	}
	c.send(shell, "execute_request", "next", map[string]any{"code": "x"})
	if r := c.recv(shell); field(r, "status") != "ok" || field(r, "execution_count") != 2.0 {
		t.Fatalf("after interrupt: got %v", content(r))
	}
}

func equal(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

var _ = bytes.Equal

func TestServerShutdownOnShell(t *testing.T) {
	s, _ := testServer(t)
	c := newClient(t)
	shell := dial(t, s.Info().ShellPort, zmq4.Dealer)
	c.send(shell, "shutdown_request", "bye", map[string]any{"restart": false})
	if r := c.recv(shell); r.Header.MsgType != "shutdown_reply" || field(r, "status") != "ok" {
		t.Fatalf("got %s %v", r.Header.MsgType, content(r))
	}
	<-s.Done()
}

func TestServerIPC(t *testing.T) {
	base := t.TempDir() + "/kernel-ipc"
	s, err := Start(ConnectionInfo{Transport: "ipc", IP: base, ShellPort: 1, IOPubPort: 2, StdinPort: 3, ControlPort: 4, HBPort: 5,
		Key: testKey}, &fakeExec{}, log.New(io.Discard, "", 0))
	if err != nil {
		t.Fatal(err)
	}
	conn, err := net.Dial("unix", base+"-1")
	if err != nil {
		t.Fatal(err)
	}
	zc, err := zmq4.Open(conn, null.Security(), zmq4.Dealer, zmq4.SocketIdentity("t"), false, nil)
	if err != nil {
		t.Fatal(err)
	}
	c := newClient(t)
	c.send(zc, "kernel_info_request", "ki", map[string]any{})
	if r := c.recv(zc); r.Header.MsgType != "kernel_info_reply" {
		t.Fatalf("got %s", r.Header.MsgType)
	}
	zc.Close()
	s.Shutdown()
	<-s.Done()
	if _, err := net.Dial("unix", base+"-1"); err == nil {
		t.Fatal("ipc socket still accepting after shutdown")
	}
}

func TestReadConnectionFile(t *testing.T) {
	dir := t.TempDir()
	write := func(name, body string) string {
		p := dir + "/" + name
		if err := os.WriteFile(p, []byte(body), 0o600); err != nil {
			t.Fatal(err)
		}
		return p
	}
	tests := []struct {
		name, body string
		ok         bool
	}{
		{"good.json", `{"transport":"tcp","ip":"127.0.0.1","shell_port":1,"iopub_port":2,"stdin_port":3,"control_port":4,"hb_port":5,"key":"k","signature_scheme":"hmac-sha256"}`, true},
		// A kernel on ports of its own choosing would be reported nowhere.
		{"empty.json", `{}`, false},
		{"noports.json", `{"transport":"tcp","ip":"127.0.0.1","key":"k"}`, false},
		{"zeroport.json", `{"transport":"tcp","ip":"127.0.0.1","shell_port":1,"iopub_port":2,"stdin_port":3,"control_port":0,"hb_port":5}`, false},
		{"noip.json", `{"transport":"tcp","shell_port":1,"iopub_port":2,"stdin_port":3,"control_port":4,"hb_port":5}`, false},
		{"badport.json", `{"transport":"tcp","ip":"127.0.0.1","shell_port":70000,"iopub_port":2,"stdin_port":3,"control_port":4,"hb_port":5}`, false},
		{"bad.json", `{"shell_port":`, false},
		{"udp.json", `{"transport":"udp","ip":"127.0.0.1","shell_port":1,"iopub_port":2,"stdin_port":3,"control_port":4,"hb_port":5}`, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ci, err := ReadConnectionFile(write(tc.name, tc.body))
			if (err == nil) != tc.ok {
				t.Fatalf("got error %v, want ok=%v", err, tc.ok)
			}
			if tc.name == "empty.json" && !strings.Contains(err.Error(), "missing transport, ip, shell_port, iopub_port, stdin_port, control_port, hb_port") {
				t.Fatalf("empty file: got %v, want every missing field named", err)
			}
			if tc.ok && (ci.Transport != "tcp" || ci.IP != "127.0.0.1") {
				t.Fatalf("defaults: got %+v", ci)
			}
		})
	}
	if _, err := ReadConnectionFile(dir + "/missing.json"); err == nil {
		t.Fatal("missing file: got nil error")
	}
}

func TestServerWarnsWithoutKey(t *testing.T) {
	for _, key := range []string{"", testKey} {
		var logged bytes.Buffer
		s, err := Start(ConnectionInfo{IP: "127.0.0.1", Key: key}, &fakeExec{started: make(chan struct{}, 1)}, log.New(&logged, "", 0))
		if err != nil {
			t.Fatal(err)
		}
		s.Shutdown()
		<-s.Done()
		if warned := strings.Contains(logged.String(), "key is empty, so messages are not signed"); warned != (key == "") {
			t.Errorf("key %q: warned %v; log %q", key, warned, logged.String())
		}
	}
}
