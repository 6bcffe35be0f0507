package kernel

import (
	"context"
	"encoding/json"
	"fmt"
	"log"
	"net"
	"os"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/go-zeromq/zmq4"
	"github.com/google/uuid"

	"Nutate/kernel/prebind"
)

// ConnectionInfo is the content of a Jupyter connection file.
type ConnectionInfo struct {
	Transport       string `json:"transport"` // "tcp" or "ipc"
	IP              string `json:"ip"`
	ShellPort       int    `json:"shell_port"`
	IOPubPort       int    `json:"iopub_port"`
	StdinPort       int    `json:"stdin_port"`
	ControlPort     int    `json:"control_port"`
	HBPort          int    `json:"hb_port"`
	Key             string `json:"key"`
	SignatureScheme string `json:"signature_scheme"`
	KernelName      string `json:"kernel_name,omitempty"`
}

// ReadConnectionFile reads and checks a connection file. Every field a client
// needs is required (transport, ip, the five ports), as Jupyter writes them: a
// kernel that picked its own ports would listen where no client looks.
func ReadConnectionFile(path string) (ConnectionInfo, error) {
	var ci ConnectionInfo
	b, err := os.ReadFile(path)
	if err != nil {
		return ci, fmt.Errorf("connection file: %w", err)
	}
	if err := json.Unmarshal(b, &ci); err != nil {
		return ci, fmt.Errorf("connection file %s: %w", path, err)
	}
	var missing []string
	if ci.Transport == "" {
		missing = append(missing, "transport")
	}
	if ci.IP == "" {
		missing = append(missing, "ip")
	}
	for _, p := range []struct {
		name string
		port int
	}{{"shell_port", ci.ShellPort}, {"iopub_port", ci.IOPubPort}, {"stdin_port", ci.StdinPort}, {"control_port", ci.ControlPort}, {"hb_port", ci.HBPort}} {
		if p.port < 0 || p.port > 65535 {
			return ci, fmt.Errorf("connection file %s: %s: got %d, want a port from 1 to 65535", path, p.name, p.port)
		}
		if p.port == 0 {
			missing = append(missing, p.name)
		}
	}
	if len(missing) > 0 {
		return ci, fmt.Errorf("connection file %s: missing %s (ports must be given, not 0); want the file Jupyter writes, with transport, ip and the five ports", path, strings.Join(missing, ", "))
	}
	if ci.Transport != "tcp" && ci.Transport != "ipc" {
		return ci, fmt.Errorf("connection file %s: transport: got %q, want tcp or ipc", path, ci.Transport)
	}
	return ci, nil
}

// unsignedWarning is logged (on standard error) when the key is empty.
const unsignedWarning = "warning: the connection file's key is empty, so messages are not signed: any process that can reach these ports can run cells in this kernel; let Jupyter write the connection file (it sets a key)"

// Server is a running kernel: five endpoints, the shell and control goroutines
// and the dispatcher.
type Server struct {
	info   ConnectionInfo
	signer *Signer
	d      *dispatcher
	log    *log.Logger

	shell, control, stdin, iopub, hb *endpoint

	shellQ, controlQ chan request
	pubMu            sync.Mutex
	topicPrefix      string

	stop      chan struct{} // closed when shutting down
	stopOnce  sync.Once
	shellDone chan struct{}
	ctrlDone  chan struct{}
	done      chan struct{}
	restart   bool

	drops atomic.Int64
}

// Timing of a shutdown: the running cell gets cellGrace to notice its
// cancelled context, then pending messages get flushGrace to leave.
const (
	cellGrace  = 2 * time.Second
	flushGrace = time.Second
)

// Start binds the five sockets described by info (a port of 0 picks a free one)
// and starts serving exec. Logs go to lg (nil: standard error).
func Start(info ConnectionInfo, exec Executor, lg *log.Logger) (*Server, error) {
	return start(info, exec, lg, nil)
}

// start is Start with a channel told of every peer that joins (tests).
func start(info ConnectionInfo, exec Executor, lg *log.Logger, joined chan<- string) (*Server, error) {
	if lg == nil {
		lg = log.New(os.Stderr, "nutate kernel: ", log.LstdFlags|log.Lmicroseconds)
	}
	signer, err := NewSigner(info.Key, info.SignatureScheme)
	if err != nil {
		return nil, err
	}
	if info.Key == "" {
		lg.Print(unsignedWarning)
	}
	RegisterTransports()
	if info.Transport == "" {
		info.Transport = "tcp"
	}
	if info.IP == "" {
		info.IP = "127.0.0.1"
	}
	session := uuid.NewString()
	s := &Server{
		info:        info,
		signer:      signer,
		log:         lg,
		shellQ:      make(chan request, 64),
		controlQ:    make(chan request, 64),
		topicPrefix: "kernel." + session + ".",
		stop:        make(chan struct{}),
		shellDone:   make(chan struct{}),
		ctrlDone:    make(chan struct{}),
		done:        make(chan struct{}),
	}
	s.d = newDispatcher(exec, session, lg, s.publish)

	var eps []*endpoint
	fail := func(err error) (*Server, error) {
		prebind.Release()
		for _, e := range eps {
			e.close()
		}
		return nil, err
	}
	listen := func(name string, port *int, typ zmq4.SocketType, onMsg func(*peer, [][]byte)) (*endpoint, error) {
		ln, err := s.listen(*port)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		if a, ok := ln.Addr().(*net.TCPAddr); ok {
			*port = a.Port
		}
		e := newEndpoint(name, typ, ln, lg, onMsg, joined)
		eps = append(eps, e)
		return e, nil
	}
	if s.iopub, err = listen("iopub", &s.info.IOPubPort, zmq4.Pub, func(*peer, [][]byte) {}); err != nil {
		return fail(err)
	}
	if s.hb, err = listen("hb", &s.info.HBPort, zmq4.Rep, echoHeartbeat); err != nil {
		return fail(err)
	}
	if s.stdin, err = listen("stdin", &s.info.StdinPort, zmq4.Router, func(*peer, [][]byte) {}); err != nil {
		return fail(err)
	}
	if s.control, err = listen("control", &s.info.ControlPort, zmq4.Router, s.queue("control", s.controlQ)); err != nil {
		return fail(err)
	}
	if s.shell, err = listen("shell", &s.info.ShellPort, zmq4.Router, s.queue("shell", s.shellQ)); err != nil {
		return fail(err)
	}

	go s.serve(s.shellQ, s.shellDone, false)
	go s.serve(s.controlQ, s.ctrlDone, true)
	go s.waitShutdown()
	return s, nil
}

// echoHeartbeat echoes a heartbeat. Heartbeats are unsigned, so only short
// ones are echoed and a peer that does not read its echoes gets no more: the
// bytes an unauthenticated peer makes the kernel hold stay small.
func echoHeartbeat(p *peer, f [][]byte) {
	n := 0
	for _, b := range f {
		n += len(b)
	}
	if n <= maxHeartbeat && p.bytes.Load() < 64*maxHeartbeat {
		p.send(f)
	}
}

// maxHeartbeat bounds an echoed heartbeat (clients send a few bytes).
const maxHeartbeat = 1 << 10

// listen returns a guarded listener on port, taking the socket bound at start
// (package prebind) when there is one. A port prebind did not bind releases the
// others it holds, so that no socket it bound can stand in the kernel's way.
func (s *Server) listen(port int) (net.Listener, error) {
	network, addr := "tcp", net.JoinHostPort(s.info.IP, strconv.Itoa(port))
	if s.info.Transport == "ipc" {
		network, addr = "unix", s.info.IP+"-"+strconv.Itoa(port)
	}
	if f := prebind.Take(network, addr); f != nil {
		ln, err := net.FileListener(f)
		f.Close()
		if err == nil {
			if u, ok := ln.(*net.UnixListener); ok {
				u.SetUnlinkOnClose(true)
			}
			return newGuardedListener(ln), nil
		}
	}
	prebind.Release()
	return GuardedTransport{Network: network}.Listen(context.Background(), addr)
}

// Info returns the connection information with the ports actually bound.
func (s *Server) Info() ConnectionInfo { return s.info }

// queue returns the endpoint callback that decodes and verifies a message and
// queues it for the shell or control goroutine. Bad messages are dropped.
func (s *Server) queue(name string, q chan request) func(*peer, [][]byte) {
	return func(p *peer, frames [][]byte) {
		m, err := s.signer.Decode(frames)
		if err != nil {
			if n := s.drops.Add(1); n <= 10 || n%1000 == 0 {
				s.log.Printf("%s: message dropped (%d so far): %v", name, n, err)
			}
			return
		}
		if debugLog {
			s.log.Printf("%s: %s %s", name, m.Header.MsgType, m.Header.MsgID)
		}
		r := request{msg: m, reply: func(out Message) {
			frames, err := s.signer.Encode(out)
			if err != nil {
				s.log.Printf("%s: cannot encode %s: %v", name, out.Header.MsgType, err)
				return
			}
			p.send(frames)
		}}
		select {
		case q <- r:
		case <-s.stop:
		}
	}
}

// publish sends m on iopub with a topic naming its type. Publications are
// serialised so every subscriber sees them in order.
func (s *Server) publish(m Message) {
	m.Idents = [][]byte{[]byte(s.topicPrefix + m.Header.MsgType)}
	frames, err := s.signer.Encode(m)
	if err != nil {
		s.log.Printf("iopub: cannot encode %s: %v", m.Header.MsgType, err)
		return
	}
	s.pubMu.Lock()
	s.iopub.broadcast(frames)
	s.pubMu.Unlock()
}

// debugLog, set by NUTATE_KERNEL_DEBUG=1, logs every request and every peer.
var debugLog = os.Getenv("NUTATE_KERNEL_DEBUG") == "1"

// iopubWait bounds how long the first request waits for an iopub subscriber.
const iopubWait = 500 * time.Millisecond

// serve runs the requests of one channel in order until shutdown.
//
// The first shell request waits (at most iopubWait) until an iopub subscriber has
// joined: a client connects all its sockets at once, and busy/idle published
// before its subscription exists are lost, which costs a client waiting for
// readiness another round of kernel_info.
func (s *Server) serve(q chan request, done chan struct{}, control bool) {
	defer close(done)
	if !control {
		s.d.queued = func() []request { return drain(q) }
	}
	first := s.iopub != nil && !control
	for {
		select {
		case r := <-q:
			if first {
				first = false
				t := time.NewTimer(iopubWait)
				select {
				case <-s.iopub.firstPeer:
				case <-t.C:
				}
				t.Stop()
			}
			for _, w := range s.d.handle(r, control) {
				if w.msg.Header.MsgType == "execute_request" {
					s.d.abort(w)
				} else {
					s.d.handle(w, control)
				}
			}
		case <-s.stop:
			return
		}
	}
}

// drain takes the requests waiting in q now, without blocking.
func drain(q chan request) []request {
	var rs []request
	for {
		select {
		case r := <-q:
			rs = append(rs, r)
		default:
			return rs
		}
	}
}

// Interrupt cancels the running cell, as interrupt_request does.
func (s *Server) Interrupt() { s.d.Interrupt() }

// Shutdown stops the kernel as shutdown_request does, without a reply.
func (s *Server) Shutdown() {
	s.d.Interrupt()
	s.d.stopOnce.Do(func() { s.d.shutdown <- false })
}

// Done is closed once the kernel has stopped and its sockets are closed.
func (s *Server) Done() <-chan struct{} { return s.done }

// Restart reports whether the shutdown that stopped the kernel asked for a
// restart. It is meaningful once Done is closed.
func (s *Server) Restart() bool { return s.restart }

func (s *Server) waitShutdown() {
	s.restart = <-s.d.shutdown
	s.stopOnce.Do(func() { close(s.stop) })
	// The control goroutine is answering the shutdown (or idle); the shell one
	// may be finishing a cancelled cell.
	t := time.NewTimer(cellGrace)
	wait := func(ch chan struct{}) bool {
		select {
		case <-ch:
			return true
		case <-t.C:
			return false
		}
	}
	if !wait(s.ctrlDone) || !wait(s.shellDone) {
		s.log.Printf("the running cell did not stop within %v; exiting anyway", cellGrace)
	}
	t.Stop()
	deadline := time.Now().Add(flushGrace)
	for _, e := range []*endpoint{s.iopub, s.shell, s.control} {
		e.flush(deadline)
	}
	for _, e := range []*endpoint{s.shell, s.control, s.stdin, s.hb, s.iopub} {
		e.close()
	}
	if s.info.Transport == "ipc" {
		for _, port := range []int{s.info.ShellPort, s.info.IOPubPort, s.info.StdinPort, s.info.ControlPort, s.info.HBPort} {
			os.Remove(s.info.IP + "-" + strconv.Itoa(port))
		}
	}
	close(s.done)
}

// Run serves exec on the sockets named by connectionFile until a shutdown
// request, the end of ctx, a request to terminate from the system, or the
// death of the parent process named by the JPY_PARENT_PID environment
// variable. What the system sends is read per system (signals_unix.go,
// signals_windows.go): on Unix SIGINT interrupts the running cell and SIGTERM
// shuts down; on Windows, where kernelspecs ask for interrupts as messages,
// Ctrl-C and the event named by JPY_INTERRUPT_EVENT interrupt, and closing the
// console shuts down.
func Run(ctx context.Context, connectionFile string, exec Executor) error {
	info, err := ReadConnectionFile(connectionFile)
	if err != nil {
		return err
	}
	s, err := Start(info, exec, nil)
	if err != nil {
		return err
	}
	sys := notifySystem()
	defer sys.stop()
	parent := os.Getenv("JPY_PARENT_PID")
	parentGone := watchParent(parent, s.Done())
	ctxDone := ctx.Done()
	for {
		select {
		case <-s.Done():
			return nil
		case <-sys.interrupt:
			s.Interrupt()
		case <-sys.terminate:
			s.Shutdown()
		case <-ctxDone:
			s.Shutdown()
			ctxDone = nil
		case <-parentGone:
			s.log.Printf("parent process (JPY_PARENT_PID=%s) is gone; shutting down", parent)
			s.Shutdown()
			parentGone = nil
		}
	}
}

// systemEvents are what the operating system asks of the kernel process.
type systemEvents struct {
	interrupt <-chan struct{} // interrupt the running cell
	terminate <-chan struct{} // shut down
	stop      func()          // stop listening
}

// poke sends on ch unless a value is already waiting there.
func poke(ch chan<- struct{}) {
	select {
	case ch <- struct{}{}:
	default:
	}
}
