package kernel

import (
	"log"
	"net"
	"sync"
	"sync/atomic"
	"time"

	"github.com/go-zeromq/zmq4"
	"github.com/go-zeromq/zmq4/security/null"
)

// An endpoint is one of the kernel's five sockets, built on zmq4's connection
// API (zmq4.Open on each accepted connection) rather than on zmq4's sockets:
// every peer has its own reader goroutine and its own bounded send queue and
// writer goroutine, so one slow or stuck peer never holds up another. The
// socket kinds differ only in what happens to incoming messages and where
// outgoing ones go:
//   - ROUTER (shell, control, stdin): a message is handed on with its peer; the
//     reply goes back to that peer (routing frames before <IDS|MSG> are echoed);
//   - PUB (iopub): incoming subscriptions are read and ignored (subscribers
//     filter on their side); broadcast puts a message in every peer's queue;
//   - REP (heartbeat): each message is echoed, envelope included.
type endpoint struct {
	name string
	typ  zmq4.SocketType
	ln   net.Listener
	log  *log.Logger

	// onMsg is called on the peer's reader goroutine for each user message.
	onMsg func(p *peer, frames [][]byte)
	// joined, when set (tests), is told of each peer that completes its handshake.
	joined chan<- string

	queueLen   int           // messages a peer's queue holds
	queueBytes int64         // bytes a peer's queue holds
	grace      time.Duration // how long a full queue may block before dropping

	firstPeer chan struct{} // closed when the first peer has joined
	firstOnce sync.Once

	mu     sync.Mutex
	peers  map[*peer]struct{}
	closed bool
	wg     sync.WaitGroup
}

// Queue limits per peer.
const (
	defaultQueueLen   = 1024
	defaultQueueBytes = 32 << 20
	defaultGrace      = 100 * time.Millisecond
)

func newEndpoint(name string, typ zmq4.SocketType, ln net.Listener, lg *log.Logger, onMsg func(*peer, [][]byte), joined chan<- string) *endpoint {
	e := &endpoint{
		name: name, typ: typ, ln: ln, log: lg, onMsg: onMsg, joined: joined,
		queueLen: defaultQueueLen, queueBytes: defaultQueueBytes, grace: defaultGrace,
		peers: make(map[*peer]struct{}), firstPeer: make(chan struct{}),
	}
	e.wg.Add(1)
	go e.acceptLoop()
	return e
}

func (e *endpoint) acceptLoop() {
	defer e.wg.Done()
	for {
		c, err := e.ln.Accept()
		if err != nil {
			return
		}
		e.wg.Add(1)
		go e.open(c)
	}
}

// open runs the ZMTP handshake (bounded by the guarded connection's deadline)
// and starts the peer.
func (e *endpoint) open(c net.Conn) {
	defer e.wg.Done()
	zc, err := zmq4.Open(c, null.Security(), e.typ, zmq4.SocketIdentity("nutate-"+e.name), true, nil)
	if err != nil {
		if debugLog {
			e.log.Printf("%s: handshake with %s failed: %v", e.name, c.RemoteAddr(), err)
		}
		c.Close()
		return
	}
	p := &peer{
		ep:   e,
		conn: zc,
		// A guarded connection counts the bytes of messages not yet checked.
		consumed: consumedFunc(c),
		addr:     c.RemoteAddr().String(),
		out:      make(chan outItem, e.queueLen),
		done:     make(chan struct{}),
	}
	e.mu.Lock()
	if e.closed {
		e.mu.Unlock()
		zc.Close()
		return
	}
	e.peers[p] = struct{}{}
	e.wg.Add(2)
	e.mu.Unlock()
	go p.readLoop()
	go p.writeLoop()
	e.firstOnce.Do(func() { close(e.firstPeer) })
	if debugLog {
		e.log.Printf("%s: peer %s joined", e.name, p.addr)
	}
	if e.joined != nil {
		e.joined <- e.name
	}
}

// broadcast queues frames for every peer.
func (e *endpoint) broadcast(frames [][]byte) {
	e.mu.Lock()
	peers := make([]*peer, 0, len(e.peers))
	for p := range e.peers {
		peers = append(peers, p)
	}
	e.mu.Unlock()
	for _, p := range peers {
		p.send(frames)
	}
}

// numPeers reports the connected peers (tests).
func (e *endpoint) numPeers() int {
	e.mu.Lock()
	defer e.mu.Unlock()
	return len(e.peers)
}

// flush waits until every peer's queue, as it stands now, has been written, or
// until the deadline.
func (e *endpoint) flush(deadline time.Time) {
	e.mu.Lock()
	var marks []chan struct{}
	for p := range e.peers {
		m := make(chan struct{})
		select {
		case p.out <- outItem{flushed: m}:
			marks = append(marks, m)
		default: // a full queue belongs to a peer that is not reading
		}
	}
	e.mu.Unlock()
	t := time.NewTimer(time.Until(deadline))
	defer t.Stop()
	for _, m := range marks {
		select {
		case <-m:
		case <-t.C:
			return
		}
	}
}

// close stops accepting, closes every peer and waits for their goroutines.
func (e *endpoint) close() {
	e.mu.Lock()
	e.closed = true
	peers := make([]*peer, 0, len(e.peers))
	for p := range e.peers {
		peers = append(peers, p)
	}
	e.mu.Unlock()
	e.ln.Close()
	for _, p := range peers {
		p.close()
	}
	e.wg.Wait()
}

// outItem is one queued message, or a flush mark.
type outItem struct {
	msg     zmq4.Msg
	size    int64
	flushed chan struct{}
}

// peer is one connected client of an endpoint.
type peer struct {
	ep       *endpoint
	conn     *zmq4.Conn
	addr     string
	out      chan outItem
	bytes    atomic.Int64
	dropping atomic.Bool
	dropped  atomic.Int64
	done     chan struct{}
	once     sync.Once
	consumed func() // nil, or tells the connection a message was handled
}

func (p *peer) close() {
	p.once.Do(func() {
		close(p.done)
		p.conn.Close()
		p.ep.mu.Lock()
		delete(p.ep.peers, p)
		p.ep.mu.Unlock()
	})
}

func (p *peer) readLoop() {
	defer p.ep.wg.Done()
	defer p.close()
	for {
		msg, err := p.conn.RecvMsg()
		if err != nil {
			return
		}
		if msg.Type != zmq4.CmdMsg {
			p.ep.onMsg(p, msg.Frames)
		}
		if p.consumed != nil {
			p.consumed() // checked and queued or dropped: no longer in flight
		}
	}
}

func (p *peer) writeLoop() {
	defer p.ep.wg.Done()
	for {
		select {
		case it := <-p.out:
			if it.flushed != nil {
				close(it.flushed)
				continue
			}
			err := p.conn.SendMsg(it.msg)
			p.bytes.Add(-it.size)
			if err != nil {
				p.close()
				return
			}
		case <-p.done:
			return
		}
	}
}

// send queues frames for this peer. A full queue blocks for at most the
// endpoint's grace; after that the peer is marked lagging and its messages are
// dropped, without waiting, until its queue has drained to half. It reports
// whether the message was queued.
func (p *peer) send(frames [][]byte) bool {
	var size int64
	for _, f := range frames {
		size += int64(len(f))
	}
	it := outItem{msg: zmq4.NewMsgFrom(frames...), size: size}
	e := p.ep
	if p.dropping.Load() {
		if len(p.out) > cap(p.out)/2 || p.bytes.Load() > e.queueBytes/2 {
			p.drop()
			return false
		}
		p.dropping.Store(false)
	}
	if p.bytes.Load()+size > e.queueBytes {
		p.dropping.Store(true)
		p.drop()
		return false
	}
	p.bytes.Add(size)
	select {
	case p.out <- it:
		return true
	case <-p.done:
		p.bytes.Add(-size)
		return false
	default:
	}
	t := time.NewTimer(e.grace)
	defer t.Stop()
	select {
	case p.out <- it:
		return true
	case <-p.done:
	case <-t.C:
		p.dropping.Store(true)
		p.drop()
	}
	p.bytes.Add(-size)
	return false
}

func (p *peer) drop() {
	if n := p.dropped.Add(1); n == 1 || n%1000 == 0 {
		p.ep.log.Printf("%s: peer %s is not reading; %d message(s) dropped for it", p.ep.name, p.addr, n)
	}
}
