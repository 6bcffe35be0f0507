package kernel

import (
	"context"
	"io"
	"log"
	"strings"
	"testing"

	"github.com/go-zeromq/zmq4"
)

// bundleExec emits one display the size of a 601-point profile bundle (SVG,
// HTML, JSON and text, about 130 KiB in all).
type bundleExec struct{ fakeExec }

var profileBundle = map[string]any{
	"text/plain":       strings.Repeat("offset profile row\n", 100),
	"text/html":        "<table>" + strings.Repeat("<tr><td>1.0</td><td>2.0</td></tr>", 300) + "</table>",
	"image/svg+xml":    "<svg>" + strings.Repeat(`<path d="M1.5,2.5 L3.5,4.5"/>`, 2500) + "</svg>",
	"application/json": map[string]any{"x": make([]float64, 601), "y": make([]float64, 601)},
}

func (bundleExec) Execute(ctx context.Context, code string, emit func(Output)) error {
	emit(Output{Data: profileBundle})
	return nil
}

// BenchmarkExecuteRoundTrip measures one execute_request over TCP from send to
// the idle status on iopub, with a profile-sized display (the transport's and
// the dispatcher's share of a cell's round trip).
func BenchmarkExecuteRoundTrip(b *testing.B) {
	joined := make(chan string, 64)
	s, err := start(ConnectionInfo{IP: "127.0.0.1", Key: testKey}, &bundleExec{}, log.New(io.Discard, "", 0), joined)
	if err != nil {
		b.Fatal(err)
	}
	defer func() { s.Shutdown(); <-s.Done() }()
	c := newClient(b)
	iopub := dial(b, s.Info().IOPubPort, zmq4.Sub)
	waitJoin(b, joined, "iopub")
	shell := dial(b, s.Info().ShellPort, zmq4.Dealer)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		id := "b" + strings.Repeat("x", i%7) + string(rune('a'+i%26)) + itoa(i)
		c.send(shell, "execute_request", id, map[string]any{"code": "sweep"})
		c.recv(shell)
		for {
			m := c.recv(iopub)
			if parentID(m) == id && m.Header.MsgType == "status" && field(m, "execution_state") == "idle" {
				break
			}
		}
	}
}

// BenchmarkStartToReady measures binding the five sockets and answering the
// first kernel_info_request of a connected client, then shutting down.
func BenchmarkStartToReady(b *testing.B) {
	for i := 0; i < b.N; i++ {
		joined := make(chan string, 64)
		s, err := start(ConnectionInfo{IP: "127.0.0.1", Key: testKey}, &fakeExec{}, log.New(io.Discard, "", 0), joined)
		if err != nil {
			b.Fatal(err)
		}
		c := newClient(b)
		iopub := dial(b, s.Info().IOPubPort, zmq4.Sub)
		shell := dial(b, s.Info().ShellPort, zmq4.Dealer)
		c.send(shell, "kernel_info_request", "ki", map[string]any{})
		c.recv(shell)
		c.recv(iopub)
		s.Shutdown()
		<-s.Done()
		iopub.Close()
		shell.Close()
	}
}

// BenchmarkEncodeDecode measures signing and verifying a profile-sized message.
func BenchmarkEncodeDecode(b *testing.B) {
	h := newHarness()
	var out Message
	h.d.publish = func(m Message) { out = m }
	h.d.emit(Message{rawHeader: []byte("{}")}, Output{Data: profileBundle})
	enc, _ := NewSigner(testKey, "")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		dec, _ := NewSigner(testKey, "")
		frames, err := enc.Encode(out)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := dec.Decode(frames); err != nil {
			b.Fatal(err)
		}
	}
}

func itoa(i int) string {
	var b [20]byte
	n := len(b)
	for {
		n--
		b[n] = byte('0' + i%10)
		i /= 10
		if i == 0 {
			return string(b[n:])
		}
	}
}
