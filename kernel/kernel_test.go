package kernel

import (
	"context"
	"encoding/json"
	"errors"
	"io"
	"log"
	"reflect"
	"strings"
	"testing"
)

// fakeExec is an in-memory Executor. Cells:
//
//	"block"     signals started, then waits for its context to be cancelled
//	"fail"      prints a line on stdout, then fails with a traceback
//	"progress"  shows a display and updates it twice
//	"panic"     panics
//	anything    shows the code as text/plain
type fakeExec struct {
	started chan struct{}
}

type tbError struct{}

func (tbError) Error() string       { return "duration expects a time, got 3 kHz" }
func (tbError) Traceback() []string { return []string{"line 1:1", "  x", "  ^"} }
func (tbError) ErrorName() string   { return "UnitError" }

func (f *fakeExec) Execute(ctx context.Context, code string, emit func(Output)) error {
	switch code {
	case "block":
		f.started <- struct{}{}
		<-ctx.Done()
		return ctx.Err()
	case "fail":
		emit(Output{Stream: "stdout", Text: "before\n"})
		return tbError{}
	case "progress":
		emit(Output{Data: map[string]any{"text/plain": "0%"}, DisplayID: "p1"})
		emit(Output{Data: map[string]any{"text/plain": "50%"}, DisplayID: "p1", Update: true})
		emit(Output{Data: map[string]any{"text/plain": "100%"}, DisplayID: "p1", Update: true})
		emit(Output{Clear: true})
		return nil
	case "panic":
		panic("boom")
	}
	emit(Output{Data: map[string]any{"text/plain": code, "image/svg+xml": "<svg/>"}})
	return nil
}

func (f *fakeExec) Complete(code string, cursor int) ([]string, int, int) {
	// Completes the word before the cursor against two names; cursor is in runes.
	r := []rune(code)
	start := cursor
	for start > 0 && r[start-1] != ' ' {
		start--
	}
	word := string(r[start:cursor])
	var m []string
	for _, n := range []string{"pulse", "print"} {
		if strings.HasPrefix(n, word) {
			m = append(m, n)
		}
	}
	return m, start, cursor
}

func (f *fakeExec) Inspect(code string, cursor, detail int) (string, bool) {
	if strings.Contains(code, "rect") {
		return "rect: constant amplitude", true
	}
	return "", false
}

func (f *fakeExec) IsComplete(code string) (string, string) {
	if strings.Count(code, "(") > strings.Count(code, ")") {
		return "incomplete", "    "
	}
	return "complete", ""
}

func (f *fakeExec) Language() LanguageInfo {
	return LanguageInfo{Name: "fake", Version: "1", Mimetype: "text/x-fake", FileExtension: ".fk",
		PygmentsLexer: "text", Banner: "fake banner", HelpLinks: []HelpLink{{"docs", "https://example.org"}}}
}

// harness drives a dispatcher in memory.
type harness struct {
	d       *dispatcher
	exec    *fakeExec
	pubs    chan Message
	replies chan Message
	n       int
}

func newHarness() *harness {
	h := &harness{exec: &fakeExec{started: make(chan struct{}, 1)}, pubs: make(chan Message, 1000), replies: make(chan Message, 100)}
	h.d = newDispatcher(h.exec, "kernel-session", log.New(io.Discard, "", 0), func(m Message) { h.pubs <- m })
	return h
}

// req builds a decoded request as the transport would hand it over.
func (h *harness) req(msgType string, content any) request {
	h.n++
	hd := Header{MsgID: msgType + "-" + string(rune('a'+h.n)), Session: "client", MsgType: msgType, Version: "5.3"}
	raw, _ := json.Marshal(hd)
	body, _ := json.Marshal(content)
	return request{
		msg:   Message{Idents: [][]byte{[]byte("route")}, Header: hd, rawHeader: raw, Content: body},
		reply: func(m Message) { h.replies <- m },
	}
}

// collect reads publications up to and including the idle status for req.
func (h *harness) collect(t *testing.T, r request) []Message {
	t.Helper()
	var out []Message
	for m := range h.pubs {
		if parentID(m) != r.msg.Header.MsgID {
			t.Fatalf("publication %s has parent %q, want %q", m.Header.MsgType, parentID(m), r.msg.Header.MsgID)
		}
		out = append(out, m)
		if m.Header.MsgType == "status" && field(m, "execution_state") == "idle" {
			return out
		}
	}
	return out
}

func parentID(m Message) string {
	var p Header
	json.Unmarshal(m.Parent, &p)
	return p.MsgID
}

func content(m Message) map[string]any {
	var c map[string]any
	json.Unmarshal(m.Content, &c)
	return c
}

func field(m Message, k string) any { return content(m)[k] }

func types(ms []Message) []string {
	var s []string
	for _, m := range ms {
		s = append(s, m.Header.MsgType)
	}
	return s
}

func TestExecuteSequence(t *testing.T) {
	// Order required by the messaging protocol ("Execute", "Kernel status"):
	// busy, execute_input, outputs, reply on shell, idle.
	h := newHarness()
	r := h.req("execute_request", map[string]any{"code": "sweep", "silent": false, "store_history": true})
	h.d.handle(r, false)
	pubs := h.collect(t, r)
	want := []string{"status", "execute_input", "display_data", "status"}
	if !reflect.DeepEqual(types(pubs), want) {
		t.Fatalf("iopub: got %v, want %v", types(pubs), want)
	}
	if field(pubs[0], "execution_state") != "busy" {
		t.Fatalf("first status: got %v, want busy", field(pubs[0], "execution_state"))
	}
	if field(pubs[1], "execution_count") != 1.0 || field(pubs[1], "code") != "sweep" {
		t.Fatalf("execute_input: got %v", content(pubs[1]))
	}
	data := field(pubs[2], "data").(map[string]any)
	if data["image/svg+xml"] != "<svg/>" {
		t.Fatalf("display_data: got %v", data)
	}
	reply := <-h.replies
	if reply.Header.MsgType != "execute_reply" || field(reply, "status") != "ok" || field(reply, "execution_count") != 1.0 {
		t.Fatalf("reply: got %s %v", reply.Header.MsgType, content(reply))
	}
	if parentID(reply) != r.msg.Header.MsgID || string(reply.Idents[0]) != "route" {
		t.Fatalf("reply: parent %q idents %q, want %q [route]", parentID(reply), reply.Idents, r.msg.Header.MsgID)
	}
	if reply.Header.Session != "kernel-session" || reply.Header.Version != "5.3" {
		t.Fatalf("reply header: got %+v", reply.Header)
	}
}

func TestExecutionCount(t *testing.T) {
	// execution_count rises only for silent=false, store_history=true
	// (messaging protocol, "Execute": execution counter).
	h := newHarness()
	cases := []struct {
		silent, store bool
		want          float64
		input         bool
	}{
		{false, true, 1, true},
		{false, false, 1, true},
		{true, false, 1, false},
		{false, true, 2, true},
	}
	for i, c := range cases {
		r := h.req("execute_request", map[string]any{"code": "x", "silent": c.silent, "store_history": c.store})
		h.d.handle(r, false)
		pubs := h.collect(t, r)
		reply := <-h.replies
		if got := field(reply, "execution_count"); got != c.want {
			t.Errorf("case %d: execution_count: got %v, want %v", i, got, c.want)
		}
		hasInput := false
		for _, m := range pubs {
			hasInput = hasInput || m.Header.MsgType == "execute_input"
		}
		if hasInput != c.input {
			t.Errorf("case %d: execute_input published: got %v, want %v", i, hasInput, c.input)
		}
	}
}

func TestExecuteError(t *testing.T) {
	h := newHarness()
	r := h.req("execute_request", map[string]any{"code": "fail"})
	h.d.handle(r, false)
	pubs := h.collect(t, r)
	want := []string{"status", "execute_input", "stream", "error", "status"}
	if !reflect.DeepEqual(types(pubs), want) {
		t.Fatalf("iopub: got %v, want %v", types(pubs), want)
	}
	errPub := content(pubs[3])
	reply := content(<-h.replies)
	for _, c := range []map[string]any{errPub, reply} {
		if c["ename"] != "UnitError" || c["evalue"] != "duration expects a time, got 3 kHz" {
			t.Fatalf("error content: got %v", c)
		}
		if !reflect.DeepEqual(c["traceback"], []any{"line 1:1", "  x", "  ^"}) {
			t.Fatalf("traceback: got %v", c["traceback"])
		}
	}
	if reply["status"] != "error" {
		t.Fatalf("reply status: got %v, want error", reply["status"])
	}
	if s := content(pubs[2]); s["name"] != "stdout" || s["text"] != "before\n" {
		t.Fatalf("stream: got %v", s)
	}
}

func TestExecutePanicBecomesError(t *testing.T) {
	h := newHarness()
	r := h.req("execute_request", map[string]any{"code": "panic"})
	h.d.handle(r, false)
	h.collect(t, r)
	reply := content(<-h.replies)
	if reply["status"] != "error" || reply["ename"] != "InternalError" || !strings.Contains(reply["evalue"].(string), "boom") {
		t.Fatalf("reply: got %v", reply)
	}
	// The session survives.
	r2 := h.req("execute_request", map[string]any{"code": "ok"})
	h.d.handle(r2, false)
	h.collect(t, r2)
	if got := field(<-h.replies, "status"); got != "ok" {
		t.Fatalf("after panic: got %v, want ok", got)
	}
}

func TestProgressDisplayUpdates(t *testing.T) {
	h := newHarness()
	r := h.req("execute_request", map[string]any{"code": "progress"})
	h.d.handle(r, false)
	pubs := h.collect(t, r)
	want := []string{"status", "execute_input", "display_data", "update_display_data", "update_display_data", "clear_output", "status"}
	if !reflect.DeepEqual(types(pubs), want) {
		t.Fatalf("iopub: got %v, want %v", types(pubs), want)
	}
	if c := content(pubs[5]); !reflect.DeepEqual(c, map[string]any{"wait": false}) {
		t.Fatalf("clear_output content: got %v, want wait false", c)
	}
	for _, m := range pubs[2:5] {
		tr, _ := field(m, "transient").(map[string]any)
		if tr["display_id"] != "p1" {
			t.Fatalf("%s transient: got %v, want display_id p1", m.Header.MsgType, field(m, "transient"))
		}
	}
	<-h.replies
}

func TestInterrupt(t *testing.T) {
	h := newHarness()
	r := h.req("execute_request", map[string]any{"code": "block"})
	done := make(chan struct{})
	go func() { h.d.handle(r, false); close(done) }()
	<-h.exec.started
	ir := h.req("interrupt_request", map[string]any{})
	h.d.handle(ir, true)
	// The interrupt's own reply.
	var intReply, execReply Message
	for intReply.Header.MsgType == "" || execReply.Header.MsgType == "" {
		m := <-h.replies
		switch m.Header.MsgType {
		case "interrupt_reply":
			intReply = m
		case "execute_reply":
			execReply = m
		}
	}
	<-done
	if field(intReply, "status") != "ok" {
		t.Fatalf("interrupt_reply: got %v", content(intReply))
	}
	if c := content(execReply); c["status"] != "error" || c["ename"] != interruptedName {
		t.Fatalf("interrupted execute_reply: got %v", c)
	}
	// The cell still went idle.
	idle := false
	for len(h.pubs) > 0 && !idle {
		m := <-h.pubs
		idle = parentID(m) == r.msg.Header.MsgID && field(m, "execution_state") == "idle"
	}
	if !idle {
		t.Fatalf("interrupted cell: no idle status published")
	}
}

func TestRequestReplies(t *testing.T) {
	h := newHarness()
	tests := []struct {
		req     string
		content map[string]any
		reply   string
		want    map[string]any
	}{
		{"kernel_info_request", nil, "kernel_info_reply", map[string]any{
			"status": "ok", "protocol_version": "5.3", "implementation": "nutate", "banner": "fake banner",
			"language_info": map[string]any{"name": "fake", "version": "1", "mimetype": "text/x-fake",
				"file_extension": ".fk", "pygments_lexer": "text", "codemirror_mode": "text/x-fake"},
			"help_links": []any{map[string]any{"text": "docs", "url": "https://example.org"}},
		}},
		// Cursor positions count unicode code points (protocol 5.2+): "µs pu" has
		// the cursor after "pu" at code point 5, not byte 6.
		{"complete_request", map[string]any{"code": "µs pu", "cursor_pos": 5}, "complete_reply", map[string]any{
			"status": "ok", "matches": []any{"pulse"}, "cursor_start": 3.0, "cursor_end": 5.0, "metadata": map[string]any{}}},
		{"complete_request", map[string]any{"code": "p", "cursor_pos": 99}, "complete_reply", map[string]any{
			"status": "ok", "matches": []any{"pulse", "print"}, "cursor_start": 0.0, "cursor_end": 1.0}},
		{"inspect_request", map[string]any{"code": "rect", "cursor_pos": 2, "detail_level": 0}, "inspect_reply", map[string]any{
			"status": "ok", "found": true, "data": map[string]any{"text/plain": "rect: constant amplitude"}, "metadata": map[string]any{}}},
		{"inspect_request", map[string]any{"code": "zzz", "cursor_pos": 1}, "inspect_reply", map[string]any{
			"status": "ok", "found": false, "data": map[string]any{}}},
		{"is_complete_request", map[string]any{"code": "pulse p = rect("}, "is_complete_reply", map[string]any{
			"status": "incomplete", "indent": "    "}},
		{"is_complete_request", map[string]any{"code": "print 1"}, "is_complete_reply", map[string]any{
			"status": "complete"}},
		{"comm_info_request", map[string]any{}, "comm_info_reply", map[string]any{"status": "ok", "comms": map[string]any{}}},
		{"history_request", map[string]any{"hist_access_type": "tail", "n": 10}, "history_reply", map[string]any{
			"status": "ok", "history": []any{}}},
	}
	for _, tc := range tests {
		t.Run(tc.req, func(t *testing.T) {
			r := h.req(tc.req, tc.content)
			h.d.handle(r, false)
			pubs := h.collect(t, r)
			if len(pubs) != 2 || field(pubs[0], "execution_state") != "busy" {
				t.Fatalf("iopub: got %v, want busy, idle", types(pubs))
			}
			reply := <-h.replies
			if reply.Header.MsgType != tc.reply {
				t.Fatalf("reply type: got %s, want %s", reply.Header.MsgType, tc.reply)
			}
			got := content(reply)
			for k, v := range tc.want {
				if !reflect.DeepEqual(got[k], v) {
					t.Errorf("%s: got %#v, want %#v", k, got[k], v)
				}
			}
			if _, has := got["indent"]; has && tc.want["status"] == "complete" {
				t.Errorf("indent sent with status complete")
			}
		})
	}
}

func TestHistory(t *testing.T) {
	h := newHarness()
	for _, code := range []string{"a", "b", "c", "a"} {
		r := h.req("execute_request", map[string]any{"code": code})
		h.d.handle(r, false)
		h.collect(t, r)
		<-h.replies
	}
	tests := []struct {
		name    string
		content map[string]any
		want    []any
	}{
		{"tail 2", map[string]any{"hist_access_type": "tail", "n": 2}, []any{[]any{1.0, 3.0, "c"}, []any{1.0, 4.0, "a"}}},
		{"range", map[string]any{"hist_access_type": "range", "start": 1, "stop": 2}, []any{[]any{1.0, 1.0, "a"}}},
		{"range this session", map[string]any{"hist_access_type": "range", "session": 1, "start": 2, "stop": 4}, []any{[]any{1.0, 2.0, "b"}, []any{1.0, 3.0, "c"}}},
		{"range previous session", map[string]any{"hist_access_type": "range", "session": -1, "start": 1, "stop": 2}, []any{}},
		{"range other session", map[string]any{"hist_access_type": "range", "session": 2, "start": 1, "stop": 2}, []any{}},
		{"search", map[string]any{"hist_access_type": "search", "pattern": "?"}, []any{[]any{1.0, 1.0, "a"}, []any{1.0, 2.0, "b"}, []any{1.0, 3.0, "c"}, []any{1.0, 4.0, "a"}}},
		{"search unique", map[string]any{"hist_access_type": "search", "pattern": "?", "unique": true}, []any{[]any{1.0, 2.0, "b"}, []any{1.0, 3.0, "c"}, []any{1.0, 4.0, "a"}}},
		{"search unique a", map[string]any{"hist_access_type": "search", "pattern": "a", "unique": true}, []any{[]any{1.0, 4.0, "a"}}},
		{"search n", map[string]any{"hist_access_type": "search", "pattern": "?", "n": 2}, []any{[]any{1.0, 3.0, "c"}, []any{1.0, 4.0, "a"}}},
		{"search none", map[string]any{"hist_access_type": "search", "pattern": "z*"}, []any{}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := h.req("history_request", tc.content)
			h.d.handle(r, false)
			h.collect(t, r)
			if got := field(<-h.replies, "history"); !reflect.DeepEqual(got, tc.want) {
				t.Fatalf("history: got %v, want %v", got, tc.want)
			}
		})
	}
}

func TestShutdownReply(t *testing.T) {
	for _, restart := range []bool{false, true} {
		h := newHarness()
		r := h.req("shutdown_request", map[string]any{"restart": restart})
		h.d.handle(r, true)
		h.collect(t, r)
		reply := <-h.replies
		if reply.Header.MsgType != "shutdown_reply" || field(reply, "restart") != restart || field(reply, "status") != "ok" {
			t.Fatalf("shutdown_reply: got %s %v", reply.Header.MsgType, content(reply))
		}
		if got := <-h.d.shutdown; got != restart {
			t.Fatalf("shutdown signal: got restart=%v, want %v", got, restart)
		}
	}
}

func TestUnknownAndCommOpen(t *testing.T) {
	h := newHarness()
	r := h.req("no_such_request", map[string]any{})
	h.d.handle(r, false)
	if got := types(h.collect(t, r)); !reflect.DeepEqual(got, []string{"status", "status"}) {
		t.Fatalf("unknown type: got %v, want busy, idle", got)
	}
	r = h.req("comm_open", map[string]any{"comm_id": "c1", "target_name": "x", "data": map[string]any{}})
	h.d.handle(r, false)
	pubs := h.collect(t, r)
	if got := types(pubs); !reflect.DeepEqual(got, []string{"status", "comm_close", "status"}) || field(pubs[1], "comm_id") != "c1" {
		t.Fatalf("comm_open: got %v", got)
	}
	if len(h.replies) != 0 {
		t.Fatalf("unexpected replies: %d", len(h.replies))
	}
}

func TestDescribeErrorPlain(t *testing.T) {
	ename, evalue, tb := describeError(errors.New("a\nb"), context.Background())
	if ename != "Error" || evalue != "a\nb" || !reflect.DeepEqual(tb, []string{"a", "b"}) {
		t.Fatalf("got %q %q %q", ename, evalue, tb)
	}
}

func TestGlobMatch(t *testing.T) {
	for _, tc := range []struct {
		p, s string
		want bool
	}{{"*", "abc", true}, {"a*c", "abbbc", true}, {"a?c", "abc", true}, {"a?c", "ac", false}, {"*sweep*", "x sweep y", true}, {"b*", "abc", false}} {
		if got := globMatch(tc.p, tc.s); got != tc.want {
			t.Errorf("globMatch(%q, %q): got %v, want %v", tc.p, tc.s, got, tc.want)
		}
	}
}

func TestStopOnErrorAbortsQueued(t *testing.T) {
	// A failed cell with stop_on_error aborts the execute requests already
	// queued (messaging protocol, "Execute": stop_on_error); other requests are
	// still answered; with stop_on_error=false the next cell runs.
	type want struct{ typ, status string }
	tests := []struct {
		name  string
		cells []map[string]any
		want  []want
	}{
		{"stop", []map[string]any{{"code": "fail"}, {"code": "queued"}, nil, {"code": "queued too"}},
			[]want{{"execute_reply", "error"}, {"execute_reply", "aborted"}, {"kernel_info_reply", "ok"}, {"execute_reply", "aborted"}}},
		{"continue", []map[string]any{{"code": "fail", "stop_on_error": false}, {"code": "runs"}},
			[]want{{"execute_reply", "error"}, {"execute_reply", "ok"}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			h := newHarness()
			s := &Server{d: h.d, stop: make(chan struct{})}
			q := make(chan request, 8)
			for _, c := range tc.cells {
				if c == nil {
					q <- h.req("kernel_info_request", map[string]any{})
				} else {
					q <- h.req("execute_request", c)
				}
			}
			done := make(chan struct{})
			go s.serve(q, done, false)
			for i, w := range tc.want {
				r := <-h.replies
				if r.Header.MsgType != w.typ || field(r, "status") != w.status {
					t.Fatalf("reply %d: got %s %v, want %s %s", i, r.Header.MsgType, field(r, "status"), w.typ, w.status)
				}
			}
			close(s.stop)
			<-done
		})
	}
}
