package kernel

import (
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"net"
	"sync"
	"sync/atomic"
	"time"

	"github.com/go-zeromq/zmq4"
	"github.com/go-zeromq/zmq4/transport"
)

// Limits of the guarded transport.
const (
	// MaxFrameSize is the largest ZMTP frame accepted. A frame header claiming more
	// closes that connection before anything is allocated. Requests are small:
	// a cell holds at most 1 MiB, 6 MiB once JSON escapes every byte.
	MaxFrameSize = 8 << 20
	// MaxMessageSize bounds the sum of the frames of one multipart message, and
	// MaxMessageFrames their number (zmq4 keeps every frame of a message in
	// memory, so a stream of empty "more" frames would otherwise grow without
	// end).
	MaxMessageSize   = 8 << 20
	MaxMessageFrames = 1 << 16
	// MaxInFlight bounds the bytes of incoming messages not yet checked, summed
	// over every connection of the process: zmq4 allocates a frame as soon as
	// its header arrives, and the signature is checked only once the whole
	// message is in. A frame that would pass the bound waits for room for up to
	// inFlightWait (longer than messageTimeout, so that peers stalling with
	// the room taken are closed first), then its connection is closed.
	MaxInFlight  = 20 << 20
	inFlightWait = 15 * time.Second
	// messageTimeout bounds the time from a message's first frame header to its
	// last byte, so a peer cannot hold its share of MaxInFlight by stalling.
	messageTimeout = 10 * time.Second
	// maxCommandSize bounds a ZMTP command frame (READY, PING: a few bytes).
	maxCommandSize = 64 << 10
	// maxConns bounds the connections one listener keeps open (a Jupyter client
	// opens one per channel).
	maxConns = 128
	// handshakeTimeout bounds the time from accept to the peer's READY command.
	handshakeTimeout = 5 * time.Second
	// writeTimeout bounds one write to a peer; a peer that does not read for this
	// long is disconnected.
	writeTimeout = 30 * time.Second
	// maxPending bounds connections accepted but still in their handshake.
	maxPending = 256
	// zmtpGreeting is the length of the ZMTP 3 greeting; its first 10 bytes are
	// the signature.
	zmtpGreeting  = 64
	zmtpSignature = 10
)

// ErrFrameTooLarge is returned by a guarded connection's Read when the peer
// announces a frame larger than MaxFrameSize.
var ErrFrameTooLarge = errors.New("kernel: zmtp frame larger than 8 MiB refused")

// ErrMessageTooLarge is returned when one multipart message exceeds
// MaxMessageSize bytes or MaxMessageFrames frames.
var ErrMessageTooLarge = errors.New("kernel: zmtp message too large refused")

// ErrInFlight is returned when the bytes of unchecked messages over all
// connections stay at MaxInFlight for inFlightWait.
var ErrInFlight = errors.New("kernel: unchecked incoming messages over 20 MiB in total; connection closed")

// inFlight counts the bytes of incoming messages announced by their frame
// headers and not yet consumed: a semaphore in bytes whose waiters give up
// after a timeout.
type inFlight struct {
	mu    sync.Mutex
	used  int64
	max   int64
	freed chan struct{} // closed and replaced on every release
}

// unchecked is the process-wide count for all guarded connections.
var unchecked = newInFlight(MaxInFlight)

func newInFlight(max int64) *inFlight { return &inFlight{max: max, freed: make(chan struct{})} }

// acquire takes n bytes, waiting up to wait for room; false if none came or
// abort was closed.
func (f *inFlight) acquire(n int64, wait time.Duration, abort <-chan struct{}) bool {
	var timer *time.Timer
	for {
		f.mu.Lock()
		if f.used+n <= f.max {
			f.used += n
			f.mu.Unlock()
			if timer != nil {
				timer.Stop()
			}
			return true
		}
		ch := f.freed
		f.mu.Unlock()
		if timer == nil {
			timer = time.NewTimer(wait)
		}
		select {
		case <-ch:
		case <-timer.C:
			return false
		case <-abort:
			timer.Stop()
			return false
		}
	}
}

func (f *inFlight) release(n int64) {
	if n == 0 {
		return
	}
	f.mu.Lock()
	f.used -= n
	close(f.freed)
	f.freed = make(chan struct{})
	f.mu.Unlock()
}

// inUse reports the bytes held (tests).
func (f *inFlight) inUse() int64 {
	f.mu.Lock()
	defer f.mu.Unlock()
	return f.used
}

// GuardedTransport is a zmq4 transport (TCP or Unix sockets) hardened for a
// kernel that any local process may connect to:
//   - it accepts on its own goroutine and hands a connection over only after the
//     10-byte ZMTP signature has arrived (waiting for more would deadlock against
//     libzmq, which sends the rest of its greeting only after ours), so an idle
//     TCP connection blocks nobody;
//   - the handshake has a deadline, lifted when the peer's first command (READY)
//     has been read;
//   - every frame header is parsed as it passes and a frame over MaxFrameSize
//     closes the connection before zmq4 allocates its body; the bytes frame
//     headers announce count against MaxInFlight (all connections together)
//     until zmq4 has handed the message on and asks for the next (the kernel
//     checks the signature in between), and a message must arrive whole within
//     messageTimeout;
//   - a listener keeps at most maxConns connections open;
//   - each write has a deadline, so a peer that never reads is eventually dropped.
//
// It is registered with zmq4 as "guarded-tcp" and "guarded-ipc" (see
// RegisterTransports), and the kernel's own endpoints listen through it.
type GuardedTransport struct {
	Network string // "tcp" or "unix"
}

var registerOnce sync.Once

// RegisterTransports registers the guarded transports with zmq4 under the names
// "guarded-tcp" and "guarded-ipc". It is safe to call more than once.
func RegisterTransports() {
	registerOnce.Do(func() {
		zmq4.RegisterTransport("guarded-tcp", GuardedTransport{Network: "tcp"})
		zmq4.RegisterTransport("guarded-ipc", GuardedTransport{Network: "unix"})
	})
}

// Dial connects without guarding (the kernel only listens).
func (g GuardedTransport) Dial(ctx context.Context, d transport.Dialer, addr string) (net.Conn, error) {
	return d.DialContext(ctx, g.Network, addr)
}

// Listen announces on addr and returns a guarded listener.
func (g GuardedTransport) Listen(ctx context.Context, addr string) (net.Listener, error) {
	l, err := net.Listen(g.Network, addr)
	if err != nil {
		return nil, err
	}
	return newGuardedListener(l), nil
}

// Addr normalises an end-point address as zmq4's own transports do.
func (g GuardedTransport) Addr(ep string) (string, error) {
	if g.Network == "unix" {
		return ep, nil
	}
	host, port, err := net.SplitHostPort(ep)
	if err != nil {
		return "", err
	}
	if port == "*" || port == "" {
		port = "0"
	}
	if host == "*" || host == "" {
		host = "0.0.0.0"
	}
	return net.JoinHostPort(host, port), nil
}

// guardedListener accepts on its own goroutine and passes on connections whose
// ZMTP signature has arrived.
type guardedListener struct {
	inner   net.Listener
	ready   chan net.Conn
	done    chan struct{}
	once    sync.Once
	pending atomic.Int32
	open    atomic.Int32 // connections accepted and not yet closed
}

func newGuardedListener(inner net.Listener) *guardedListener {
	l := &guardedListener{inner: inner, ready: make(chan net.Conn), done: make(chan struct{})}
	go l.acceptLoop()
	return l
}

func (l *guardedListener) acceptLoop() {
	for {
		c, err := l.inner.Accept()
		if err != nil {
			var ne net.Error
			if errors.As(err, &ne) && ne.Timeout() {
				continue
			}
			l.Close()
			return
		}
		if l.pending.Load() >= maxPending || l.open.Load() >= maxConns {
			c.Close()
			continue
		}
		l.pending.Add(1)
		l.open.Add(1)
		go l.screen(c)
	}
}

// screen waits (with a deadline) for the 10-byte signature, then offers the
// connection to Accept.
func (l *guardedListener) screen(c net.Conn) {
	defer l.pending.Add(-1)
	c.SetDeadline(time.Now().Add(handshakeTimeout))
	sig := make([]byte, zmtpSignature)
	if _, err := io.ReadFull(c, sig); err != nil || sig[0] != 0xff || sig[9] != 0x7f {
		c.Close()
		l.open.Add(-1)
		return
	}
	gc := newGuardedConn(c, sig, unchecked)
	gc.onClose = func() { l.open.Add(-1) }
	select {
	case l.ready <- gc:
	case <-l.done:
		gc.Close()
	}
}

// Accept returns the next connection that has sent its ZMTP signature.
func (l *guardedListener) Accept() (net.Conn, error) {
	select {
	case c := <-l.ready:
		return c, nil
	case <-l.done:
		return nil, net.ErrClosed
	}
}

func (l *guardedListener) Close() error {
	var err error
	l.once.Do(func() {
		close(l.done)
		err = l.inner.Close()
	})
	return err
}

func (l *guardedListener) Addr() net.Addr { return l.inner.Addr() }

// guardedConn replays the screened signature, parses the incoming ZMTP stream
// to refuse oversized frames, lifts the handshake deadline once the peer's
// first command has arrived, and puts a deadline on every write.
//
// It also answers ZMTP heartbeats itself. zmq4 replies to a PING from inside
// RecvMsg, on the reading goroutine, while another goroutine may be writing a
// multipart message: the PONG then lands between two frames and breaks the
// stream. So incoming PING commands are taken out of the stream here and their
// PONGs are written only between messages, which the connection knows by
// following its own outgoing frames.
type guardedConn struct {
	net.Conn
	prefix []byte

	rmu   sync.Mutex // the read side: in, rerr, guard
	in    []byte     // checked bytes waiting for Read
	rerr  error      // read error to report once in is empty
	buf   []byte     // network read buffer
	guard frameGuard

	// Bytes of unchecked messages (see MaxInFlight): delivered counts the
	// bytes Read has returned; ends holds, for each message whose last frame
	// has passed the guard, the stream offset just after it. When zmq4 reads
	// beyond a message's end, it has handed that message on (the endpoint's
	// reader checks it before receiving again) and its bytes are released.
	delivered uint64
	closeOnce sync.Once
	closed    chan struct{} // closed by Close: stops a wait for room
	onClose   func()

	wmu     sync.Mutex // held for each network write
	smu     sync.Mutex // out and pending
	out     frameGuard // follows outgoing frames to find message boundaries
	pending [][]byte   // PONG frames waiting for a boundary
}

func newGuardedConn(c net.Conn, prefix []byte, limit *inFlight) *guardedConn {
	gc := &guardedConn{Conn: c, prefix: prefix, buf: make([]byte, 32<<10), closed: make(chan struct{})}
	gc.guard = frameGuard{greeting: zmtpGreeting, holdCommands: true, limit: limit, abort: gc.closed}
	gc.out = frameGuard{greeting: zmtpGreeting, noLimits: true}
	return gc
}

// consumedFunc returns, for a guarded connection, the function that releases
// the messages zmq4 has read in full (the endpoint calls it after handling
// each), else nil.
func consumedFunc(c net.Conn) func() {
	gc, ok := c.(*guardedConn)
	if !ok {
		return nil
	}
	return func() {
		gc.rmu.Lock()
		gc.guard.releaseUpTo(gc.delivered)
		gc.rmu.Unlock()
	}
}

// Close closes the connection and releases the bytes its messages held.
func (c *guardedConn) Close() error {
	err := c.Conn.Close()
	c.closeOnce.Do(func() {
		close(c.closed)
		c.rmu.Lock()
		c.guard.releaseAll()
		c.rmu.Unlock()
		if c.onClose != nil {
			c.onClose()
		}
	})
	return err
}

func (c *guardedConn) Read(p []byte) (int, error) {
	c.rmu.Lock()
	defer c.rmu.Unlock()
	c.guard.releaseUpTo(c.delivered)
	for len(c.in) == 0 && c.rerr == nil {
		var chunk []byte
		if len(c.prefix) > 0 {
			chunk, c.prefix = c.prefix, nil
		} else {
			n, err := c.Conn.Read(c.buf)
			chunk, c.rerr = c.buf[:n], err
		}
		commands, started := c.guard.commands, c.guard.started
		var pings [][]byte
		var gerr error
		c.in, pings, gerr = c.guard.filter(chunk, c.in[:0])
		if gerr != nil {
			c.Conn.Close()
			c.guard.releaseAll()
			c.in, c.rerr = nil, gerr
			break
		}
		switch {
		case c.guard.started > started && c.guard.msgFrames > 0:
			// A message has begun and is still coming in.
			c.Conn.SetReadDeadline(time.Now().Add(messageTimeout))
		case commands == 0 && c.guard.commands > 0, c.guard.started > started:
			// The handshake is done, or the messages begun are complete.
			c.Conn.SetReadDeadline(time.Time{})
		}
		for _, body := range pings {
			c.pong(body)
		}
	}
	if len(c.in) == 0 {
		return 0, c.rerr
	}
	n := copy(p, c.in)
	c.in = c.in[n:]
	c.delivered += uint64(n)
	return n, nil
}

// pong answers a PING (ZMTP 3.1, rfc.zeromq.org/spec/37: body is the 2-byte
// TTL then up to 16 bytes of context, which the PONG echoes).
func (c *guardedConn) pong(ping []byte) {
	ctx := []byte{}
	if len(ping) > 2 {
		ctx = ping[2:min(len(ping), 18)]
	}
	body := append([]byte("\x04PONG"), ctx...)
	frame := append([]byte{0x04, byte(len(body))}, body...)
	c.smu.Lock()
	if c.out.atBoundary() && c.wmu.TryLock() {
		c.smu.Unlock()
		c.write(frame)
		c.wmu.Unlock()
		return
	}
	// A message is being written: the writer sends the PONG after it.
	c.pending = append(c.pending, frame)
	c.smu.Unlock()
}

func (c *guardedConn) Write(p []byte) (int, error) {
	c.wmu.Lock()
	defer c.wmu.Unlock()
	n, err := c.write(p)
	c.smu.Lock()
	c.out.filter(p[:n], nil)
	var pongs [][]byte
	if c.out.atBoundary() {
		pongs, c.pending = c.pending, nil
	}
	c.smu.Unlock()
	for _, f := range pongs {
		if _, err := c.write(f); err != nil {
			break
		}
	}
	return n, err
}

// write writes p with a deadline; the caller holds wmu.
func (c *guardedConn) write(p []byte) (int, error) {
	c.Conn.SetWriteDeadline(time.Now().Add(writeTimeout))
	n, err := c.Conn.Write(p)
	if err != nil {
		var ne net.Error
		if errors.As(err, &ne) && ne.Timeout() {
			// A peer that has not read for writeTimeout is gone for our purposes;
			// closing makes zmq4 and our endpoints forget it.
			c.Conn.Close()
		}
	}
	return n, err
}

// frameGuard follows a ZMTP 3 byte stream (greeting, then frames of flags,
// size and body). On the incoming side it refuses frames larger than
// MaxFrameSize and messages over MaxMessageSize or MaxMessageFrames, and holds
// command frames back until complete so PINGs can be taken out; on the
// outgoing side it only tracks message boundaries.
// Frame layout: ZMTP 3.0, https://rfc.zeromq.org/spec/23/ (flags bit 0 =
// more frames follow, bit 1 = long size of 8 bytes network order, bit 2 =
// command).
type frameGuard struct {
	holdCommands bool // hold command frames and take PINGs out
	noLimits     bool // outgoing side: no size bounds

	greeting int // greeting bytes still to pass
	state    int // 0: flags, 1: size bytes, 2: body
	flags    byte
	size     [8]byte
	sizeGot  int
	sizeLen  int
	body     uint64
	more     bool   // inside a multipart message
	holding  bool   // the current frame is a command being held back
	cmd      []byte // the command frame being held back
	commands int    // command frames completed

	msgFrames int    // frames of the current multipart message so far
	msgBytes  uint64 // their bytes

	// Incoming side: the bytes announced by frame headers are taken from limit
	// (nil: not counted) and held in reserved for the current message; a
	// complete message's share moves to ends with its end offset in the output
	// stream, emitted counting the bytes passed on so far.
	limit    *inFlight
	wait     time.Duration   // how long a frame waits for room (0: inFlightWait)
	abort    <-chan struct{} // closed when the connection closes
	reserved int64
	ends     []msgEnd
	emitted  uint64
	outStart int // where this call's output began in out
	started  int // messages whose first frame header has passed
}

type msgEnd struct {
	offset uint64
	bytes  int64
}

// releaseUpTo releases the messages that end at or before offset.
func (g *frameGuard) releaseUpTo(offset uint64) {
	k := 0
	for k < len(g.ends) && g.ends[k].offset <= offset {
		g.limit.release(g.ends[k].bytes)
		k++
	}
	g.ends = g.ends[k:]
}

// releaseAll releases everything held (the connection is closed).
func (g *frameGuard) releaseAll() {
	for _, e := range g.ends {
		g.limit.release(e.bytes)
	}
	g.ends = nil
	if g.limit != nil {
		g.limit.release(g.reserved)
	}
	g.reserved = 0
}

// atBoundary reports whether the stream is between messages.
func (g *frameGuard) atBoundary() bool {
	return g.greeting == 0 && g.state == 0 && !g.more
}

// feed checks p, discarding the bytes (tests).
func (g *frameGuard) feed(p []byte) error {
	_, _, err := g.filter(p, nil)
	return err
}

// filter checks in and appends to out the bytes to pass on; complete PING
// commands are left out and their bodies returned.
func (g *frameGuard) filter(in, out []byte) ([]byte, [][]byte, error) {
	start := len(out)
	g.outStart = start
	defer func() { g.emitted += uint64(len(out) - start) }()
	var pings [][]byte
	pass := func(b []byte) {
		if g.holding {
			g.cmd = append(g.cmd, b...)
		} else {
			out = append(out, b...)
		}
	}
	for len(in) > 0 {
		if g.greeting > 0 {
			k := min(g.greeting, len(in))
			out = append(out, in[:k]...)
			g.greeting -= k
			in = in[k:]
			continue
		}
		switch g.state {
		case 0:
			g.flags = in[0]
			g.state = 1
			g.holding = g.holdCommands && g.flags&0x04 != 0
			g.cmd = g.cmd[:0]
			pass(in[:1])
			in = in[1:]
			g.sizeGot = 0
			g.sizeLen = 1
			if g.flags&0x02 != 0 {
				g.sizeLen = 8
			}
		case 1:
			k := copy(g.size[g.sizeGot:g.sizeLen], in)
			pass(in[:k])
			g.sizeGot += k
			in = in[k:]
			if g.sizeGot < g.sizeLen {
				continue
			}
			if g.sizeLen == 1 {
				g.body = uint64(g.size[0])
			} else {
				g.body = binary.BigEndian.Uint64(g.size[:8])
			}
			if !g.noLimits {
				if g.body > MaxFrameSize {
					return out, pings, fmt.Errorf("%w (header claims %d bytes)", ErrFrameTooLarge, g.body)
				}
				if g.flags&0x04 != 0 && g.body > maxCommandSize {
					return out, pings, fmt.Errorf("%w (a command frame of %d bytes, want at most %d)", ErrFrameTooLarge, g.body, maxCommandSize)
				}
				if g.flags&0x04 == 0 {
					if g.msgFrames == 0 {
						g.started++
					}
					g.msgFrames++
					g.msgBytes += g.body
					if g.msgFrames > MaxMessageFrames || g.msgBytes > MaxMessageSize {
						return out, pings, fmt.Errorf("%w (%d frames, %d bytes so far)", ErrMessageTooLarge, g.msgFrames, g.msgBytes)
					}
					if g.limit != nil {
						// zmq4 allocates the body when it reads this header;
						// a frame header costs it a slice header too.
						n := int64(g.body) + 64
						wait := g.wait
						if wait == 0 {
							wait = inFlightWait
						}
						if !g.limit.acquire(n, wait, g.abort) {
							return out, pings, ErrInFlight
						}
						g.reserved += n
					}
				}
			}
			g.state = 2
			if g.body == 0 {
				out, pings = g.endFrame(out, pings)
			}
		case 2:
			k := uint64(len(in))
			if k > g.body {
				k = g.body
			}
			pass(in[:k])
			g.body -= k
			in = in[k:]
			if g.body == 0 {
				out, pings = g.endFrame(out, pings)
			}
		}
	}
	return out, pings, nil
}

// endFrame closes the current frame: a held command is passed on, or taken
// out if it is a PING.
func (g *frameGuard) endFrame(out []byte, pings [][]byte) ([]byte, [][]byte) {
	g.state = 0
	if g.flags&0x04 == 0 {
		g.more = g.flags&0x01 != 0
		if !g.more {
			g.msgFrames, g.msgBytes = 0, 0 // the last frame of a message
			if g.reserved > 0 {
				g.ends = append(g.ends, msgEnd{offset: g.emitted + uint64(len(out)-g.outStart), bytes: g.reserved})
				g.reserved = 0
			}
		}
		return out, pings
	}
	g.commands++
	if !g.holding {
		return out, pings
	}
	g.holding = false
	hdr := 2
	if g.flags&0x02 != 0 {
		hdr = 9
	}
	body := g.cmd[hdr:]
	if len(body) >= 5 && body[0] == 4 && string(body[1:5]) == "PING" {
		pings = append(pings, append([]byte(nil), body[5:]...))
	} else {
		out = append(out, g.cmd...)
	}
	g.cmd = g.cmd[:0]
	return out, pings
}
