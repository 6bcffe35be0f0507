package kernel

import (
	"bytes"
	"crypto/hmac"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"strconv"
	"testing"
	"time"
)

// signedFrames builds wire frames the way a Jupyter client does: HMAC-SHA256 hex
// over header, parent, metadata, content (messaging protocol, "The Wire
// Protocol", jupyter-client documentation).
func signedFrames(key, msgType, content string, idents ...string) [][]byte {
	h, _ := json.Marshal(Header{MsgID: "m-" + msgType + "-" + content, Session: "s", Username: "u",
		Date: "2026-01-01T00:00:00.000000Z", MsgType: msgType, Version: "5.3"})
	parts := [][]byte{h, []byte("{}"), []byte("{}"), []byte(content)}
	sig := ""
	if key != "" {
		m := hmac.New(sha256.New, []byte(key))
		for _, p := range parts {
			m.Write(p)
		}
		sig = hex.EncodeToString(m.Sum(nil))
	}
	var frames [][]byte
	for _, id := range idents {
		frames = append(frames, []byte(id))
	}
	frames = append(frames, []byte("<IDS|MSG>"), []byte(sig))
	return append(frames, parts...)
}

func TestDecode(t *testing.T) {
	const key = "secret"
	good := signedFrames(key, "kernel_info_request", "{}", "id1", "id2")
	tampered := signedFrames(key, "kernel_info_request", "{}")
	tampered[5] = []byte(`{"x":1}`)
	wrongKey := signedFrames("other", "kernel_info_request", "{}")
	missing := signedFrames(key, "kernel_info_request", "{}")
	missing[1] = []byte("")
	notHex := signedFrames(key, "kernel_info_request", "{}")
	notHex[1] = []byte("zz")
	badHeader := signedFrames("", "kernel_info_request", "{}")
	badHeader[2] = []byte("{not json")
	noType := signedFrames("", "", "{}")
	badContent := signedFrames("", "execute_request", "{")

	tests := []struct {
		name   string
		key    string
		frames [][]byte
		want   error
	}{
		{"good", key, good, nil},
		{"tampered content", key, tampered, ErrSignature},
		{"wrong key", key, wrongKey, ErrSignature},
		{"missing signature", key, missing, ErrSignature},
		{"signature not hex", key, notHex, ErrSignature},
		{"no delimiter", key, good[2:2], ErrNoDelimiter},
		{"only delimiter", key, [][]byte{[]byte("<IDS|MSG>"), []byte("x")}, ErrShortMessage},
		{"unsigned accepted with empty key", "", wrongKey, nil},
		{"malformed header", "", badHeader, ErrHeader},
		{"header without msg_type", "", noType, ErrHeader},
		{"malformed content", "", badContent, ErrHeader},
		{"empty", key, nil, ErrNoDelimiter},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := NewSigner(tc.key, "hmac-sha256")
			if err != nil {
				t.Fatal(err)
			}
			m, err := s.Decode(tc.frames)
			if !errors.Is(err, tc.want) {
				t.Fatalf("Decode: got error %v, want %v", err, tc.want)
			}
			if tc.want == nil && m.Header.MsgType == "" {
				t.Fatalf("Decode: got empty msg_type")
			}
		})
	}
}

func TestDecodeKeepsIdentities(t *testing.T) {
	s, _ := NewSigner("k", "")
	m, err := s.Decode(signedFrames("k", "kernel_info_request", "{}", "a", "b"))
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Idents) != 2 || string(m.Idents[0]) != "a" || string(m.Idents[1]) != "b" {
		t.Fatalf("Idents: got %q, want [a b]", m.Idents)
	}
}

func TestReplayRefused(t *testing.T) {
	s, _ := NewSigner("k", "hmac-sha256")
	f := signedFrames("k", "execute_request", `{"code":"x"}`)
	if _, err := s.Decode(f); err != nil {
		t.Fatalf("first: got %v, want nil", err)
	}
	if _, err := s.Decode(f); !errors.Is(err, ErrReplay) {
		t.Fatalf("replay: got %v, want %v", err, ErrReplay)
	}
	// A different message with the same key is still fine.
	if _, err := s.Decode(signedFrames("k", "execute_request", `{"code":"y"}`)); err != nil {
		t.Fatalf("next: got %v, want nil", err)
	}
}

func TestReplayMemoryIsBounded(t *testing.T) {
	s, _ := NewSigner("k", "")
	key := func(i int) macKey {
		var k macKey
		copy(k[:], strconv.Itoa(i))
		return k
	}
	for i := 0; i < replayMemory+10; i++ {
		s.remember(key(i))
	}
	if len(s.seen) != replayMemory {
		t.Fatalf("remembered: got %d, want %d", len(s.seen), replayMemory)
	}
	// The oldest were forgotten, the newest are refused.
	if !s.remember(key(0)) {
		t.Fatalf("oldest signature still remembered")
	}
	if s.remember(key(replayMemory + 9)) {
		t.Fatalf("newest signature forgotten")
	}
}

func TestEncodeRoundTrip(t *testing.T) {
	for _, key := range []string{"", "k"} {
		t.Run("key="+key, func(t *testing.T) {
			enc, _ := NewSigner(key, "hmac-sha256")
			dec, _ := NewSigner(key, "hmac-sha256")
			in := Message{
				Idents:  [][]byte{[]byte("route")},
				Header:  newHeader("execute_reply", "sess"),
				Parent:  json.RawMessage(`{"msg_id":"p"}`),
				Content: json.RawMessage(`{"status":"ok"}`),
				Buffers: [][]byte{{1, 2, 3}},
			}
			frames, err := enc.Encode(in)
			if err != nil {
				t.Fatal(err)
			}
			out, err := dec.Decode(frames)
			if err != nil {
				t.Fatalf("Decode(Encode): %v", err)
			}
			if out.Header != in.Header || !bytes.Equal(out.Content, in.Content) || !bytes.Equal(out.Parent, in.Parent) {
				t.Fatalf("round trip: got %+v, want %+v", out, in)
			}
			if string(out.Metadata) != "{}" || len(out.Buffers) != 1 || string(out.Idents[0]) != "route" {
				t.Fatalf("round trip: metadata %s, buffers %v, idents %q", out.Metadata, out.Buffers, out.Idents)
			}
			if key == "" && len(frames[2]) != 0 {
				t.Fatalf("unsigned: got signature %q, want empty", frames[2])
			}
		})
	}
}

func TestHeaderFields(t *testing.T) {
	h := newHeader("status", "sess")
	if h.Version != "5.3" || h.MsgType != "status" || h.Session != "sess" || h.MsgID == "" {
		t.Fatalf("header: got %+v", h)
	}
	// ISO 8601 with microseconds, UTC (messaging protocol: "date" field).
	if _, err := time.Parse("2006-01-02T15:04:05.000000Z07:00", h.Date); err != nil {
		t.Fatalf("date %q: %v", h.Date, err)
	}
}

func TestSignatureSchemes(t *testing.T) {
	for _, tc := range []struct {
		scheme string
		ok     bool
	}{{"hmac-sha256", true}, {"", true}, {"hmac-sha512", true}, {"rot13", false}} {
		_, err := NewSigner("k", tc.scheme)
		if (err == nil) != tc.ok {
			t.Errorf("NewSigner(%q): got error %v, want ok=%v", tc.scheme, err, tc.ok)
		}
	}
}

func FuzzDecode(f *testing.F) {
	for _, fr := range signedFrames("k", "execute_request", `{"code":"x"}`, "id") {
		f.Add(fr)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		s, _ := NewSigner("k", "")
		frames := bytes.Split(b, []byte{0})
		s.Decode(frames) // must not panic
		s2, _ := NewSigner("", "")
		s2.Decode(frames)
	})
}
