// Package kernel speaks the Jupyter messaging protocol (version 5.3) over ZeroMQ
// and runs cells through an Executor. It knows nothing of the pulse language:
// main wires the language to the Executor interface, and tests use an
// in-memory fake.
//
// Entry points: Run serves the sockets named by a connection file until a
// shutdown (the `nutate kernel` command); Start binds and serves a
// ConnectionInfo and returns a Server (tests, embedding).
//
// Behaviour, by channel:
//   - shell: every request is bracketed by status busy and idle on iopub with
//     the request's header as parent. execute_request publishes execute_input,
//     then the cell's outputs (stream, display_data, update_display_data with
//     transient.display_id), then error if it failed, and replies on shell
//     (ok, error with ename/evalue/traceback, or aborted for cells queued behind
//     a failure with stop_on_error). execution_count rises when silent is false
//     and store_history is true. complete, inspect, is_complete, history and
//     comm_info are answered; comm_open is closed politely; unknown types are
//     logged. The first shell request waits (at most 500 ms) for an iopub
//     subscriber so a starting client does not miss its busy/idle.
//   - control, on its own goroutine: interrupt_request cancels the running
//     cell's context (the cell still replies and goes idle; names survive),
//     shutdown_request (also accepted on shell) replies, lets the cell stop,
//     flushes pending messages and exits well inside 5 s, echoing restart;
//     kernel_info_request.
//   - heartbeat echoes; stdin accepts connections (the kernel never asks for
//     input).
//   - memory: a cell that allocated 64 MiB or more (a large map) hands the
//     heap it no longer uses back to the system after its reply and before its
//     idle status, so an idle kernel's resident size comes back near where
//     it was (memory.go).
//   - Run also shuts down when the parent named by JPY_PARENT_PID dies (a
//     process id on Unix, an inherited process handle on Windows, as
//     jupyter_client sets it). On Unix SIGINT interrupts and SIGTERM shuts
//     down; on Windows, where the kernelspec asks for interrupt_request
//     messages, Ctrl-C and the event named by JPY_INTERRUPT_EVENT interrupt
//     and closing the console shuts down (signals_*.go).
//
// Messages are signed with HMAC (hmac-sha256 unless the connection file says
// otherwise) over header, parent header, metadata and content, compared in
// constant time; messages with bad, missing or replayed signatures and
// malformed messages are dropped without stopping. An empty key means
// unsigned, and the kernel says so on standard error. A connection file must
// give transport, ip and the five ports (a kernel on ports of its own choosing
// would be reported nowhere).
//
// Transport: each socket is an endpoint built on zmq4's connection API
// (zmq4.Open, SendMsg, RecvMsg) over GuardedTransport. Every peer has its own
// reader, bounded send queue and writer, so a subscriber that stops reading
// loses messages (after a 100 ms grace) without slowing anyone else. The
// guarded transport accepts on its own goroutine and hands a connection over
// only once its 10-byte ZMTP signature has arrived, bounds the handshake with
// a deadline, refuses frames over 8 MiB (and messages over 8 MiB or 65536
// frames, command frames over 64 KiB) before anything is allocated, holds the
// bytes of messages not yet checked to 20 MiB over all connections (a message
// must arrive whole within 10 s), keeps at most 128 connections per socket,
// bounds every write, and answers ZMTP
// heartbeat PINGs itself, between messages (zmq4 answers them from its reader
// while a writer may be halfway through a message, which breaks the stream).
//
// NUTATE_KERNEL_DEBUG=1 logs every request, peer and execution time to
// standard error.
package kernel
