package kernel

import (
	"io"
	"log"
	"testing"
	"time"
)

// stuckPeer is a peer whose writer never runs, like a subscriber that stopped
// reading once the socket buffers are full.
func stuckPeer(queueLen int) *peer {
	e := &endpoint{name: "iopub", log: log.New(io.Discard, "", 0), queueLen: queueLen,
		queueBytes: 1 << 20, grace: time.Millisecond}
	return &peer{ep: e, out: make(chan outItem, queueLen), done: make(chan struct{})}
}

func TestPeerDropsWhenFull(t *testing.T) {
	p := stuckPeer(4)
	for i := 0; i < 4; i++ {
		if !p.send([][]byte{[]byte("m")}) {
			t.Fatalf("message %d: dropped with room in the queue", i)
		}
	}
	// Full: the next message waits out the grace and is dropped; the peer is
	// then marked lagging so later messages are dropped without waiting.
	if p.send([][]byte{[]byte("m")}) {
		t.Fatal("message to a full queue: got queued")
	}
	if !p.dropping.Load() {
		t.Fatal("peer not marked lagging after a drop")
	}
	if p.send([][]byte{[]byte("m")}) || p.dropped.Load() != 2 {
		t.Fatalf("lagging peer: dropped %d, want 2", p.dropped.Load())
	}
	// Once the reader has drained the queue below half, delivery resumes.
	<-p.out
	<-p.out
	<-p.out
	if !p.send([][]byte{[]byte("m")}) || p.dropping.Load() {
		t.Fatal("drained peer: message not queued")
	}
}

func TestPeerByteBound(t *testing.T) {
	p := stuckPeer(100)
	p.ep.queueBytes = 10
	if !p.send([][]byte{make([]byte, 6)}) {
		t.Fatal("first message dropped")
	}
	if p.send([][]byte{make([]byte, 6)}) {
		t.Fatal("message over the byte bound queued")
	}
	if p.bytes.Load() != 6 {
		t.Fatalf("queued bytes: got %d, want 6", p.bytes.Load())
	}
}
