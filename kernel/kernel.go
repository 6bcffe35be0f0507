package kernel

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log"
	"runtime/debug"
	"slices"
	"strings"
	"sync"
	"time"
	"unicode/utf8"
)

// request is one decoded shell or control message and the way back to its sender.
type request struct {
	msg   Message
	reply func(Message)
}

// dispatcher answers requests; it is the protocol logic without any transport,
// so tests drive it with in-memory replies and publications.
type dispatcher struct {
	exec    Executor
	session string
	log     *log.Logger
	publish func(Message)    // on iopub; must keep order
	queued  func() []request // takes the shell requests waiting now (nil: none)

	mu        sync.Mutex
	cancelRun context.CancelFunc // cancels the running cell, nil when idle
	count     int                // execution_count
	history   []string           // cells run with store_history

	shutdown chan bool // receives the restart flag once
	stopOnce sync.Once
}

func newDispatcher(exec Executor, session string, lg *log.Logger, publish func(Message)) *dispatcher {
	return &dispatcher{exec: exec, session: session, log: lg, publish: publish, shutdown: make(chan bool, 1)}
}

// message builds a message of msgType answering parent.
func (d *dispatcher) message(parent Message, msgType string, content any) Message {
	body, err := marshal(content)
	if err != nil {
		// Contents are built here from plain maps; a failure is a bug, reported
		// rather than sent half-formed.
		d.log.Printf("cannot encode %s: %v", msgType, err)
		body = []byte("{}")
	}
	return Message{
		Header:   newHeader(msgType, d.session),
		Parent:   parent.rawHeader,
		Metadata: json.RawMessage("{}"),
		Content:  body,
	}
}

// marshal encodes v as JSON without escaping <, > and & (the default escaping
// would swell SVG and HTML outputs for nothing: messages are not embedded in HTML).
func marshal(v any) ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return bytes.TrimRight(buf.Bytes(), "\n"), nil
}

// pub publishes msgType with content on iopub, parented to req.
func (d *dispatcher) pub(req Message, msgType string, content any) {
	d.publish(d.message(req, msgType, content))
}

// answer sends the reply to req's sender, echoing its routing identities.
func (d *dispatcher) answer(r request, msgType string, content any) {
	m := d.message(r.msg, msgType, content)
	m.Idents = r.msg.Idents
	r.reply(m)
}

func (d *dispatcher) status(req Message, state string) {
	d.pub(req, "status", map[string]any{"execution_state": state})
}

// handle answers one request, bracketed by busy and idle on iopub. It runs on
// the shell goroutine for shell requests and on the control goroutine for
// control requests; only execute_request is long. When a cell fails with
// stop_on_error, it returns the requests that were waiting when the cell
// failed (taken with d.queued): their execute requests are to be aborted.
func (d *dispatcher) handle(r request, control bool) (waiting []request) {
	d.status(r.msg, "busy")
	defer d.status(r.msg, "idle")
	switch t := r.msg.Header.MsgType; t {
	case "kernel_info_request":
		d.kernelInfo(r)
	case "shutdown_request":
		d.shutdownRequest(r)
	case "interrupt_request":
		d.Interrupt()
		d.answer(r, "interrupt_reply", map[string]any{"status": "ok"})
	case "execute_request":
		if control {
			d.log.Printf("execute_request on control ignored")
			return
		}
		return d.execute(r)
	case "complete_request":
		d.complete(r)
	case "inspect_request":
		d.inspect(r)
	case "is_complete_request":
		d.isComplete(r)
	case "history_request":
		d.historyRequest(r)
	case "comm_info_request":
		d.answer(r, "comm_info_reply", map[string]any{"status": "ok", "comms": map[string]any{}})
	case "comm_open":
		// No comm targets exist: close the comm politely.
		var c struct {
			CommID string `json:"comm_id"`
		}
		json.Unmarshal(r.msg.Content, &c)
		d.pub(r.msg, "comm_close", map[string]any{"comm_id": c.CommID, "data": map[string]any{}})
	case "comm_msg", "comm_close":
		// Nothing to do: no comm was ever opened.
	default:
		d.log.Printf("unknown message type %q ignored", t)
	}
	return nil
}

// abort answers an execute_request that was queued behind a failed cell with
// stop_on_error (messaging protocol, "Execute": status "aborted").
func (d *dispatcher) abort(r request) {
	d.status(r.msg, "busy")
	d.answer(r, "execute_reply", map[string]any{"status": "aborted"})
	d.status(r.msg, "idle")
}

func (d *dispatcher) kernelInfo(r request) {
	li := d.exec.Language()
	links := make([]map[string]string, 0, len(li.HelpLinks))
	for _, h := range li.HelpLinks {
		links = append(links, map[string]string{"text": h.Text, "url": h.URL})
	}
	lang := li.Map()
	d.answer(r, "kernel_info_reply", map[string]any{
		"status":                 "ok",
		"protocol_version":       ProtocolVersion,
		"implementation":         "nutate",
		"implementation_version": li.Version,
		"language_info":          lang,
		"banner":                 li.Banner,
		"help_links":             links,
		"debugger":               false,
	})
}

func (d *dispatcher) shutdownRequest(r request) {
	var c struct {
		Restart bool `json:"restart"`
	}
	json.Unmarshal(r.msg.Content, &c)
	d.Interrupt()
	content := map[string]any{"status": "ok", "restart": c.Restart}
	d.answer(r, "shutdown_reply", content)
	// Clients since protocol 5.4 may also look for the reply on iopub.
	d.pub(r.msg, "shutdown_reply", content)
	d.stopOnce.Do(func() { d.shutdown <- c.Restart })
}

// Interrupt cancels the running cell, if any. The cell still replies and the
// kernel goes idle; the session survives.
func (d *dispatcher) Interrupt() {
	d.mu.Lock()
	if d.cancelRun != nil {
		d.cancelRun()
	}
	d.mu.Unlock()
}

// errInterrupted is what an interrupted cell reports.
const interruptedName = "Interrupted"

func (d *dispatcher) execute(r request) (waiting []request) {
	var c struct {
		Code         string `json:"code"`
		Silent       bool   `json:"silent"`
		StoreHistory *bool  `json:"store_history"`
		StopOnError  *bool  `json:"stop_on_error"`
	}
	if err := json.Unmarshal(r.msg.Content, &c); err != nil {
		d.replyError(r, "execute_reply", "BadRequest", "execute_request: content: "+err.Error(), nil)
		return nil
	}
	store := !c.Silent && (c.StoreHistory == nil || *c.StoreHistory)

	ctx, cancel := context.WithCancel(context.Background())
	d.mu.Lock()
	if store {
		d.count++
		d.history = append(d.history, c.Code)
	}
	count := d.count
	d.cancelRun = cancel
	d.mu.Unlock()
	defer func() {
		d.mu.Lock()
		d.cancelRun = nil
		d.mu.Unlock()
		cancel()
	}()

	if !c.Silent {
		d.pub(r.msg, "execute_input", map[string]any{"code": c.Code, "execution_count": count})
	}
	emit := func(o Output) { d.emit(r.msg, o) }
	t0 := time.Now()
	// After the reply, before the idle status (memory.go).
	defer releaseAfter(allocatedBytes())
	err := d.run(ctx, c.Code, emit)
	if debugLog {
		d.log.Printf("execute %s: %v", r.msg.Header.MsgID, time.Since(t0))
	}
	if err == nil && ctx.Err() != nil {
		// Cancelled but the executor finished anyway: the cell is complete.
		err = nil
	}
	if err == nil {
		d.answer(r, "execute_reply", map[string]any{
			"status":           "ok",
			"execution_count":  count,
			"user_expressions": map[string]any{},
			"payload":          []any{},
		})
		return nil
	}
	// Requests that arrived while the cell ran are the ones stop_on_error
	// aborts; they are taken before the reply, so a client that sends its next
	// cell on seeing the reply is not aborted.
	if !c.Silent && (c.StopOnError == nil || *c.StopOnError) && d.queued != nil {
		waiting = d.queued()
	}
	ename, evalue, tb := describeError(err, ctx)
	errContent := map[string]any{"ename": ename, "evalue": evalue, "traceback": tb}
	d.pub(r.msg, "error", errContent)
	d.answer(r, "execute_reply", map[string]any{
		"status":          "error",
		"execution_count": count,
		"ename":           ename,
		"evalue":          evalue,
		"traceback":       tb,
	})
	return waiting
}

// run calls the executor, turning a panic into an error: the one recover at the
// edge of execution.
func (d *dispatcher) run(ctx context.Context, code string, emit func(Output)) (err error) {
	defer func() {
		if v := recover(); v != nil {
			d.log.Printf("panic in cell: %v\n%s", v, debug.Stack())
			err = &internalError{fmt.Sprint(v)}
		}
	}()
	return d.exec.Execute(ctx, code, emit)
}

type internalError struct{ v string }

func (e *internalError) Error() string { return "internal error: " + e.v }

// describeError gives ename, evalue and traceback for a failed cell. An error
// may supply its own name (ErrorName() string) and traceback (Traceback() []string).
func describeError(err error, ctx context.Context) (string, string, []string) {
	if errors.Is(err, context.Canceled) || (ctx.Err() != nil && errors.Is(err, ctx.Err())) {
		return interruptedName, "the cell was interrupted", []string{"Interrupted: the cell was interrupted; names defined before the interrupt are kept"}
	}
	ename := "Error"
	var named interface{ ErrorName() string }
	if errors.As(err, &named) {
		ename = named.ErrorName()
	}
	var ie *internalError
	if errors.As(err, &ie) {
		ename = "InternalError"
	}
	evalue := err.Error()
	var tb []string
	var withTB interface{ Traceback() []string }
	if errors.As(err, &withTB) {
		tb = withTB.Traceback()
	}
	if len(tb) == 0 {
		tb = strings.Split(evalue, "\n")
	}
	return ename, evalue, tb
}

func (d *dispatcher) replyError(r request, msgType, ename, evalue string, extra map[string]any) {
	content := map[string]any{"status": "error", "ename": ename, "evalue": evalue, "traceback": []string{evalue}}
	for k, v := range extra {
		content[k] = v
	}
	d.answer(r, msgType, content)
}

// emit publishes one output of a running cell.
func (d *dispatcher) emit(req Message, o Output) {
	typ, body, err := o.Encode()
	if err != nil {
		// A bundle holds strings, numbers and JSON from the executor; a failure
		// is a bug, reported rather than sent half-formed.
		d.log.Printf("cannot encode %s: %v", typ, err)
		body = []byte("{}")
	}
	d.publish(Message{
		Header:   newHeader(typ, d.session),
		Parent:   req.rawHeader,
		Metadata: json.RawMessage("{}"),
		Content:  body,
	})
}

// clampCursor keeps a client's cursor (unicode code points) inside code.
func clampCursor(code string, cursor *int) int {
	n := utf8.RuneCountInString(code)
	if cursor == nil || *cursor > n {
		return n
	}
	if *cursor < 0 {
		return 0
	}
	return *cursor
}

func (d *dispatcher) complete(r request) {
	var c struct {
		Code      string `json:"code"`
		CursorPos *int   `json:"cursor_pos"`
	}
	json.Unmarshal(r.msg.Content, &c)
	cursor := clampCursor(c.Code, c.CursorPos)
	matches, start, end := d.safeComplete(c.Code, cursor)
	if matches == nil {
		matches = []string{}
	}
	d.answer(r, "complete_reply", map[string]any{
		"status":       "ok",
		"matches":      matches,
		"cursor_start": start,
		"cursor_end":   end,
		"metadata":     map[string]any{},
	})
}

func (d *dispatcher) safeComplete(code string, cursor int) (m []string, start, end int) {
	defer func() {
		if v := recover(); v != nil {
			d.log.Printf("panic in complete: %v\n%s", v, debug.Stack())
			m, start, end = nil, cursor, cursor
		}
	}()
	return d.exec.Complete(code, cursor)
}

func (d *dispatcher) inspect(r request) {
	var c struct {
		Code        string `json:"code"`
		CursorPos   *int   `json:"cursor_pos"`
		DetailLevel int    `json:"detail_level"`
	}
	json.Unmarshal(r.msg.Content, &c)
	cursor := clampCursor(c.Code, c.CursorPos)
	text, found := func() (text string, found bool) {
		defer func() {
			if v := recover(); v != nil {
				d.log.Printf("panic in inspect: %v\n%s", v, debug.Stack())
				text, found = "", false
			}
		}()
		return d.exec.Inspect(c.Code, cursor, c.DetailLevel)
	}()
	data := map[string]any{}
	if found {
		data["text/plain"] = text
	}
	d.answer(r, "inspect_reply", map[string]any{
		"status":   "ok",
		"found":    found,
		"data":     data,
		"metadata": map[string]any{},
	})
}

func (d *dispatcher) isComplete(r request) {
	var c struct {
		Code string `json:"code"`
	}
	json.Unmarshal(r.msg.Content, &c)
	status, indent := func() (s, i string) {
		defer func() {
			if v := recover(); v != nil {
				d.log.Printf("panic in is_complete: %v\n%s", v, debug.Stack())
				s, i = "unknown", ""
			}
		}()
		return d.exec.IsComplete(c.Code)
	}()
	content := map[string]any{"status": status}
	if status == "incomplete" {
		content["indent"] = indent
	}
	d.answer(r, "is_complete_reply", content)
}

// historySession is the session number reported in history entries.
const historySession = 1

func (d *dispatcher) historyRequest(r request) {
	var c struct {
		Output         bool   `json:"output"`
		HistAccessType string `json:"hist_access_type"`
		Session        int    `json:"session"`
		Start          int    `json:"start"`
		Stop           int    `json:"stop"`
		N              int    `json:"n"`
		Pattern        string `json:"pattern"`
		Unique         bool   `json:"unique"`
	}
	json.Unmarshal(r.msg.Content, &c)
	d.mu.Lock()
	cells := append([]string(nil), d.history...)
	d.mu.Unlock()
	// Entries are [session, line, input]; lines count from 1.
	type entry struct {
		line int
		code string
	}
	var picked []entry
	switch c.HistAccessType {
	case "tail":
		from := 0
		if c.N > 0 && c.N < len(cells) {
			from = len(cells) - c.N
		}
		for i := from; i < len(cells); i++ {
			picked = append(picked, entry{i + 1, cells[i]})
		}
	case "range":
		// One session per kernel: 0 (the current one, as negative numbers
		// count back from it) or its own number; earlier sessions hold nothing.
		if c.Session != 0 && c.Session != historySession {
			break
		}
		stop := c.Stop
		if stop <= 0 || stop > len(cells)+1 {
			stop = len(cells) + 1
		}
		for line := max(c.Start, 1); line < stop; line++ {
			picked = append(picked, entry{line, cells[line-1]})
		}
	case "search":
		for i, code := range cells {
			if globMatch(c.Pattern, code) {
				picked = append(picked, entry{i + 1, code})
			}
		}
		if c.Unique {
			// Keep the latest run of each input, in order (as IPython's history
			// search does).
			seen := map[string]bool{}
			kept := picked[:0:0]
			for i := len(picked) - 1; i >= 0; i-- {
				if !seen[picked[i].code] {
					seen[picked[i].code] = true
					kept = append(kept, picked[i])
				}
			}
			slices.Reverse(kept)
			picked = kept
		}
		if c.N > 0 && len(picked) > c.N {
			picked = picked[len(picked)-c.N:]
		}
	}
	hist := make([]any, 0, len(picked))
	for _, e := range picked {
		if c.Output {
			hist = append(hist, []any{historySession, e.line, []any{e.code, nil}})
		} else {
			hist = append(hist, []any{historySession, e.line, e.code})
		}
	}
	d.answer(r, "history_reply", map[string]any{"status": "ok", "history": hist})
}

// globMatch matches s against a pattern where * is any run and ? any rune
// (the history search pattern of the protocol).
func globMatch(pattern, s string) bool {
	if pattern == "" {
		return true
	}
	p, t := []rune(pattern), []rune(s)
	// Iterative wildcard matching with backtracking to the last star.
	pi, ti, star, mark := 0, 0, -1, 0
	for ti < len(t) {
		switch {
		case pi < len(p) && (p[pi] == '?' || p[pi] == t[ti]):
			pi++
			ti++
		case pi < len(p) && p[pi] == '*':
			star, mark = pi, ti
			pi++
		case star >= 0:
			pi = star + 1
			mark++
			ti = mark
		default:
			return false
		}
	}
	for pi < len(p) && p[pi] == '*' {
		pi++
	}
	return pi == len(p)
}
