package kernel

import (
	"testing"

	"github.com/go-zeromq/zmq4"
)

// TestPingsDoNotCorruptMessages sends ZMTP PING commands (ZMTP 3.1 heartbeats,
// rfc.zeromq.org/spec/37) on iopub while the kernel publishes: the PONGs the
// kernel sends back must never land between the frames of a message.
func TestPingsDoNotCorruptMessages(t *testing.T) {
	s, joined := testServer(t)
	c := newClient(t)
	iopub := dial(t, s.Info().IOPubPort, zmq4.Sub)
	waitJoin(t, joined, "iopub")
	shell := dial(t, s.Info().ShellPort, zmq4.Dealer)
	const cells = 300
	go func() {
		for i := 0; i < cells*4; i++ {
			if iopub.SendCmd(zmq4.CmdPing, []byte{0, 10, 'c', 't', 'x'}) != nil {
				return
			}
		}
	}()
	for i := 0; i < cells; i++ {
		c.send(shell, "execute_request", "cell"+itoa(i), map[string]any{"code": "x"})
	}
	idles := 0
	for idles < cells {
		msg, err := iopub.RecvMsg()
		if err != nil {
			t.Fatalf("iopub stream broken after %d cells: %v", idles, err)
		}
		if msg.Type == zmq4.CmdMsg {
			continue
		}
		m, err := c.signer.Decode(msg.Frames)
		if err != nil {
			t.Fatalf("iopub message after %d cells does not decode: %v (%d frames)", idles, err, len(msg.Frames))
		}
		if m.Header.MsgType == "status" && field(m, "execution_state") == "idle" {
			idles++
		}
	}
}
