package kernel

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"io"
	"log"
	"net"
	"os"
	"testing"
	"time"

	"github.com/go-zeromq/zmq4"
)

// zmtpFrame builds one ZMTP 3 frame: flags, 1- or 8-byte size, body
// (ZMTP 3.0 specification, rfc.zeromq.org/spec/23, "Framing").
func zmtpFrame(flags byte, body []byte) []byte {
	if len(body) > 255 {
		out := []byte{flags | 0x02, 0, 0, 0, 0, 0, 0, 0, 0}
		binary.BigEndian.PutUint64(out[1:], uint64(len(body)))
		return append(out, body...)
	}
	return append([]byte{flags, byte(len(body))}, body...)
}

func TestFrameGuard(t *testing.T) {
	greeting := make([]byte, zmtpGreeting)
	greeting[0], greeting[9] = 0xff, 0x7f
	ready := zmtpFrame(0x04, []byte("\x05READY"))
	small := zmtpFrame(0x01, []byte("hello"))
	long := zmtpFrame(0x00, make([]byte, 1000))
	huge := []byte{0x02, 0, 0, 1, 0, 0, 0, 0, 0} // claims 2^40 bytes (1 TiB)
	justOver := []byte{0x02, 0, 0, 0, 0, 0x10, 0, 0, 1}

	stream := func(parts ...[]byte) []byte {
		var b []byte
		for _, p := range parts {
			b = append(b, p...)
		}
		return b
	}
	tests := []struct {
		name     string
		data     []byte
		wantErr  bool
		commands int
	}{
		{"greeting ready frames", stream(greeting, ready, small, long), false, 1},
		{"1 TiB header", stream(greeting, ready, huge), true, 1},
		{"just over the bound", stream(greeting, ready, justOver), true, 1},
		{"huge header during handshake", stream(greeting, huge), true, 0},
	}
	for _, tc := range tests {
		// Feed in every chunking from 1 byte to the whole stream: the parser
		// must not depend on how reads split the bytes.
		for _, chunk := range []int{1, 2, 3, 7, 64, len(tc.data)} {
			t.Run(tc.name, func(t *testing.T) {
				g := frameGuard{greeting: zmtpGreeting}
				var err error
				for i := 0; i < len(tc.data) && err == nil; i += chunk {
					err = g.feed(tc.data[i:min(i+chunk, len(tc.data))])
				}
				if (err != nil) != tc.wantErr {
					t.Fatalf("chunk %d: got error %v, want error=%v", chunk, err, tc.wantErr)
				}
				if err != nil && !errors.Is(err, ErrFrameTooLarge) {
					t.Fatalf("chunk %d: got %v, want ErrFrameTooLarge", chunk, err)
				}
				if g.commands != tc.commands {
					t.Fatalf("chunk %d: commands: got %d, want %d", chunk, g.commands, tc.commands)
				}
			})
		}
	}
}

func TestFrameGuardMessageBounds(t *testing.T) {
	empty := []byte{0x01, 0} // an empty frame with "more" set
	last := []byte{0x00, 0}
	t.Run("many frames, each message under the bound", func(t *testing.T) {
		g := frameGuard{}
		for m := 0; m < 3; m++ {
			for i := 0; i < MaxMessageFrames-1; i++ {
				if err := g.feed(empty); err != nil {
					t.Fatalf("message %d frame %d: %v", m, i, err)
				}
			}
			if err := g.feed(last); err != nil {
				t.Fatalf("message %d last frame: %v", m, err)
			}
		}
	})
	t.Run("one message over the frame bound", func(t *testing.T) {
		g := frameGuard{}
		var err error
		for i := 0; i <= MaxMessageFrames && err == nil; i++ {
			err = g.feed(empty)
		}
		if !errors.Is(err, ErrMessageTooLarge) {
			t.Fatalf("got %v, want ErrMessageTooLarge", err)
		}
	})
	t.Run("one message over the byte bound", func(t *testing.T) {
		g := frameGuard{}
		hdr := []byte{0x03, 0, 0, 0, 0, 0, 0, 0, 0}
		binary.BigEndian.PutUint64(hdr[1:], MaxFrameSize)
		if err := g.feed(hdr); err != nil {
			t.Fatal(err)
		}
		g.state, g.body = 0, 0 // pretend the body passed
		g.endFrame(nil, nil)
		if err := g.feed([]byte{0x00, 1}); !errors.Is(err, ErrMessageTooLarge) {
			t.Fatalf("got %v, want ErrMessageTooLarge", err)
		}
	})
}

func TestFrameGuardAtBound(t *testing.T) {
	g := frameGuard{}
	hdr := []byte{0x02, 0, 0, 0, 0, 0, 0, 0, 0}
	binary.BigEndian.PutUint64(hdr[1:], MaxFrameSize)
	if err := g.feed(hdr); err != nil {
		t.Fatalf("frame of exactly MaxFrameSize: got %v, want accepted", err)
	}
}

// TestGuardedTransportWithZmq4Sockets shows the registered transport fixing
// zmq4's own sockets: zmq4's accept loop runs each handshake in turn, so
// without the guard one idle TCP connection would keep the REQ client below
// from ever being accepted.
func TestGuardedTransportWithZmq4Sockets(t *testing.T) {
	RegisterTransports()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	rep := zmq4.NewRep(ctx, zmq4.WithLogger(log.New(io.Discard, "", 0)))
	defer rep.Close()
	if err := rep.Listen("guarded-tcp://127.0.0.1:0"); err != nil {
		t.Fatal(err)
	}
	addr := rep.Addr().String()
	idle, err := net.Dial("tcp", addr)
	if err != nil {
		t.Fatal(err)
	}
	defer idle.Close()
	// A frame header claiming 1 TiB right after the greeting: refused, and the
	// socket keeps serving.
	huge, err := net.Dial("tcp", addr)
	if err != nil {
		t.Fatal(err)
	}
	defer huge.Close()
	greet := make([]byte, 64)
	greet[0], greet[9], greet[10] = 0xff, 0x7f, 3
	copy(greet[12:], "NULL")
	huge.Write(append(greet, 0x06, 0, 0, 1, 0, 0, 0, 0, 0))

	req := zmq4.NewReq(ctx)
	defer req.Close()
	if err := req.Dial("tcp://" + addr); err != nil {
		t.Fatal(err)
	}
	go func() {
		msg, err := rep.Recv()
		if err == nil {
			rep.Send(msg)
		}
	}()
	if err := req.Send(zmq4.NewMsgString("ping")); err != nil {
		t.Fatal(err)
	}
	msg, err := req.Recv()
	if err != nil || string(msg.Frames[0]) != "ping" {
		t.Fatalf("echo through the guarded transport: got %q, %v", msg.Frames, err)
	}
}

// FuzzFrameGuard feeds arbitrary streams: the guard never panics, and it only
// ever refuses a stream for an oversized frame or message.
func FuzzFrameGuard(f *testing.F) {
	greeting := make([]byte, zmtpGreeting)
	greeting[0], greeting[9] = 0xff, 0x7f
	f.Add(append(greeting, zmtpFrame(0x04, []byte("\x05READY"))...))
	f.Add(append(greeting, 0x02, 0, 0, 1, 0, 0, 0, 0, 0))
	f.Fuzz(func(t *testing.T, b []byte) {
		g := frameGuard{greeting: zmtpGreeting}
		if err := g.feed(b); err != nil && !errors.Is(err, ErrFrameTooLarge) && !errors.Is(err, ErrMessageTooLarge) {
			t.Fatalf("unexpected error %v", err)
		}
	})
}

func TestFrameGuardTakesOutPings(t *testing.T) {
	greeting := make([]byte, zmtpGreeting)
	greeting[0], greeting[9] = 0xff, 0x7f
	ready := zmtpFrame(0x04, []byte("\x05READY\x0bSocket-Type\x00\x00\x00\x03SUB"))
	ping := zmtpFrame(0x04, []byte("\x04PING\x00\x0actx"))
	longPing := append([]byte{0x06, 0, 0, 0, 0, 0, 0, 0, 7}, []byte("\x04PING\x00\x0a")...)
	msg1 := zmtpFrame(0x01, []byte("part one"))
	msg2 := zmtpFrame(0x00, make([]byte, 300))
	other := zmtpFrame(0x04, []byte("\x05ERROR\x03bad"))

	var stream, want []byte
	for _, part := range [][]byte{greeting, ready, ping, msg1, msg2, longPing, other, ping} {
		stream = append(stream, part...)
		if !bytes.Equal(part, ping) && !bytes.Equal(part, longPing) {
			want = append(want, part...)
		}
	}
	for _, chunk := range []int{1, 2, 5, 64, len(stream)} {
		g := frameGuard{greeting: zmtpGreeting, holdCommands: true}
		var out []byte
		var pings [][]byte
		for i := 0; i < len(stream); i += chunk {
			var p [][]byte
			var err error
			out, p, err = g.filter(stream[i:min(i+chunk, len(stream))], out)
			if err != nil {
				t.Fatalf("chunk %d: %v", chunk, err)
			}
			pings = append(pings, p...)
		}
		if !bytes.Equal(out, want) {
			t.Fatalf("chunk %d: passed %d bytes, want %d (the stream without its PINGs)", chunk, len(out), len(want))
		}
		if len(pings) != 3 || string(pings[0]) != "\x00\x0actx" || string(pings[1]) != "\x00\x0a" {
			t.Fatalf("chunk %d: pings %q", chunk, pings)
		}
		if !g.atBoundary() {
			t.Fatalf("chunk %d: not at a message boundary at the end", chunk)
		}
	}
}

func TestFrameGuardBoundaries(t *testing.T) {
	g := frameGuard{noLimits: true}
	steps := []struct {
		bytes    []byte
		boundary bool
	}{
		{zmtpFrame(0x01, []byte("a")), false},
		{zmtpFrame(0x01, []byte("b")), false},
		{[]byte{0x00, 3, 'c'}, false}, // last frame, body incomplete
		{[]byte("de"), true},
		{zmtpFrame(0x04, []byte("\x04PONG")), true},
	}
	for i, s := range steps {
		g.filter(s.bytes, nil)
		if g.atBoundary() != s.boundary {
			t.Fatalf("step %d: atBoundary %v, want %v", i, g.atBoundary(), s.boundary)
		}
	}
}

// TestFrameGuardCountsUncheckedBytes follows one connection's share of the
// in-flight bound: taken when a data frame's header passes, kept until the
// reader has gone past the message's end, and given back on close.
func TestFrameGuardCountsUncheckedBytes(t *testing.T) {
	limit := newInFlight(3 * (1000 + 64))
	g := frameGuard{limit: limit, wait: time.Millisecond}
	msg := append(zmtpFrame(0x01, make([]byte, 1000)), zmtpFrame(0x00, make([]byte, 1000))...)
	out, _, err := g.filter(msg[:1200], nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := limit.inUse(); got != 2*(1000+64) {
		t.Fatalf("two frame headers passed: in use %d, want %d", got, 2*(1000+64))
	}
	out, _, err = g.filter(msg[1200:], out)
	if err != nil {
		t.Fatal(err)
	}
	g.releaseUpTo(uint64(len(out)) - 1)
	if got := limit.inUse(); got != 2*(1000+64) {
		t.Fatalf("message not yet read to its end: in use %d, want it held", got)
	}
	g.releaseUpTo(uint64(len(out)))
	if got := limit.inUse(); got != 0 {
		t.Fatalf("message read: in use %d, want 0", got)
	}
	// A second connection holding most of the room: a frame that does not fit
	// waits, then is refused.
	other := frameGuard{limit: limit, wait: time.Millisecond}
	if err := other.feed(zmtpFrame(0x01, make([]byte, 2000))[:9]); err != nil {
		t.Fatal(err)
	}
	if err := g.feed(zmtpFrame(0x00, make([]byte, 1200))[:9]); !errors.Is(err, ErrInFlight) {
		t.Fatalf("frame over the room left: got %v, want ErrInFlight", err)
	}
	other.releaseAll()
	if got := limit.inUse(); got != 0 {
		t.Fatalf("after close: in use %d, want 0", got)
	}
	// Command frames are bounded on their own.
	cmd := frameGuard{holdCommands: true}
	if err := cmd.feed([]byte{0x06, 0, 0, 0, 0, 0, 1, 0, 1}); !errors.Is(err, ErrFrameTooLarge) {
		t.Fatalf("command frame over 64 KiB: got %v, want ErrFrameTooLarge", err)
	}
}

// TestGuardedListenerBoundsConnections: past maxConns open connections, new
// ones are closed at once; closing one makes room again.
func TestGuardedListenerBoundsConnections(t *testing.T) {
	inner, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	l := newGuardedListener(inner)
	defer l.Close()
	accepted := make(chan net.Conn, maxConns+2)
	go func() {
		for {
			c, err := l.Accept()
			if err != nil {
				return
			}
			accepted <- c
		}
	}()
	sig := make([]byte, zmtpSignature)
	sig[0], sig[9] = 0xff, 0x7f
	dialSig := func() net.Conn {
		c, err := net.Dial("tcp", inner.Addr().String())
		if err != nil {
			t.Fatal(err)
		}
		c.Write(sig)
		return c
	}
	var held []net.Conn
	for i := 0; i < maxConns; i++ {
		c := dialSig()
		defer c.Close()
		held = append(held, <-accepted)
	}
	extra := dialSig()
	defer extra.Close()
	extra.SetReadDeadline(time.Now().Add(10 * time.Second)) // a bound for a failing test, not a wait
	if _, err := extra.Read(make([]byte, 1)); err == nil || errors.Is(err, os.ErrDeadlineExceeded) {
		t.Fatalf("connection %d: got %v, want it closed by the kernel", maxConns+1, err)
	}
	held[0].Close()
	again := dialSig()
	defer again.Close()
	if c := <-accepted; c == nil {
		t.Fatal("no connection accepted after one closed")
	}
}
