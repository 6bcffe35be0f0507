package kernel

import (
	"bytes"
	"crypto/hmac"
	"crypto/md5"
	"crypto/sha1"
	"crypto/sha256"
	"crypto/sha512"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"hash"
	"sync"
	"time"

	"github.com/google/uuid"
)

// ProtocolVersion is the Jupyter messaging protocol version this kernel speaks.
const ProtocolVersion = "5.3"

// delimiter separates routing identities from the signed part of a message.
var delimiter = []byte("<IDS|MSG>")

// Header is a Jupyter message header.
type Header struct {
	MsgID    string `json:"msg_id"`
	Session  string `json:"session"`
	Username string `json:"username"`
	Date     string `json:"date"`
	MsgType  string `json:"msg_type"`
	Version  string `json:"version"`
}

// Message is one Jupyter message: routing identities, the four signed parts and
// any binary buffers. Content and Metadata stay raw JSON on receipt so that each
// handler decodes only what it needs.
type Message struct {
	Idents   [][]byte
	Header   Header
	Parent   json.RawMessage // the parent header as received ({} when none)
	Metadata json.RawMessage
	Content  json.RawMessage
	Buffers  [][]byte

	rawHeader json.RawMessage // the header as received, the parent of replies
}

// Errors returned by (*Signer).Decode. Each one means "drop the message".
var (
	ErrNoDelimiter  = errors.New("kernel: message has no <IDS|MSG> delimiter")
	ErrShortMessage = errors.New("kernel: message has fewer than 5 frames after the delimiter")
	ErrSignature    = errors.New("kernel: bad or missing signature")
	ErrReplay       = errors.New("kernel: replayed signature")
	ErrHeader       = errors.New("kernel: malformed header")
)

// Signer signs outgoing and verifies incoming messages with HMAC over the header,
// parent header, metadata and content frames, and refuses signatures it has
// already seen (replays). An empty key means messages are neither signed nor
// checked. A Signer is safe for concurrent use.
type Signer struct {
	key     []byte
	newHash func() hash.Hash

	mu   sync.Mutex
	seen map[macKey]struct{}
	ring []macKey // the seen signatures in arrival order, to forget the oldest
	next int
}

// macKey holds the first 32 bytes of a MAC: plenty to tell messages apart,
// and a fixed size keeps the replay memory small (about 3 MB when full).
type macKey [32]byte

// replayMemory is how many recent signatures are remembered to refuse replays.
const replayMemory = 1 << 16

// NewSigner returns a Signer for key and scheme ("hmac-sha256" is what Jupyter
// uses; "" means hmac-sha256).
func NewSigner(key, scheme string) (*Signer, error) {
	s := &Signer{key: []byte(key), seen: make(map[macKey]struct{})}
	switch scheme {
	case "", "hmac-sha256":
		s.newHash = sha256.New
	case "hmac-sha512":
		s.newHash = sha512.New
	case "hmac-sha1":
		s.newHash = sha1.New
	case "hmac-md5":
		s.newHash = md5.New
	default:
		return nil, fmt.Errorf("signature_scheme: got %q, want hmac-sha256", scheme)
	}
	return s, nil
}

// mac returns the raw HMAC of parts.
func (s *Signer) mac(parts ...[]byte) []byte {
	m := hmac.New(s.newHash, s.key)
	for _, p := range parts {
		m.Write(p)
	}
	return m.Sum(nil)
}

// sign returns the hex signature of parts, or an empty frame when unsigned.
func (s *Signer) sign(parts ...[]byte) []byte {
	if len(s.key) == 0 {
		return []byte{}
	}
	sum := s.mac(parts...)
	out := make([]byte, hex.EncodedLen(len(sum)))
	hex.Encode(out, sum)
	return out
}

// Decode splits frames into a Message, verifying the signature and refusing
// replays. It never panics on malformed input.
func (s *Signer) Decode(frames [][]byte) (Message, error) {
	var m Message
	i := 0
	for ; i < len(frames); i++ {
		if bytes.Equal(frames[i], delimiter) {
			break
		}
	}
	if i == len(frames) {
		return m, ErrNoDelimiter
	}
	rest := frames[i+1:]
	if len(rest) < 5 {
		return m, ErrShortMessage
	}
	sig, header, parent, meta, content := rest[0], rest[1], rest[2], rest[3], rest[4]
	if len(s.key) > 0 {
		got := make([]byte, hex.DecodedLen(len(sig)))
		if _, err := hex.Decode(got, sig); err != nil {
			return m, ErrSignature
		}
		// hmac.Equal compares in constant time.
		if !hmac.Equal(got, s.mac(header, parent, meta, content)) {
			return m, ErrSignature
		}
		var k macKey
		copy(k[:], got)
		if !s.remember(k) {
			return m, ErrReplay
		}
	}
	if err := json.Unmarshal(header, &m.Header); err != nil || m.Header.MsgType == "" {
		return m, ErrHeader
	}
	if !json.Valid(parent) || !json.Valid(meta) || !json.Valid(content) {
		return m, ErrHeader
	}
	m.rawHeader = header
	m.Idents = frames[:i]
	m.Parent = parent
	m.Metadata = meta
	m.Content = content
	m.Buffers = rest[5:]
	return m, nil
}

// remember records sig and reports whether it was new.
func (s *Signer) remember(sig macKey) bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	if _, dup := s.seen[sig]; dup {
		return false
	}
	if len(s.ring) < replayMemory {
		s.ring = append(s.ring, sig)
	} else {
		delete(s.seen, s.ring[s.next])
		s.ring[s.next] = sig
		s.next = (s.next + 1) % replayMemory
	}
	s.seen[sig] = struct{}{}
	return true
}

// Encode returns the wire frames of m, signed.
func (s *Signer) Encode(m Message) ([][]byte, error) {
	header, err := json.Marshal(m.Header)
	if err != nil {
		return nil, err
	}
	parent := []byte(m.Parent)
	if len(parent) == 0 {
		parent = []byte("{}")
	}
	meta := []byte(m.Metadata)
	if len(meta) == 0 {
		meta = []byte("{}")
	}
	content := []byte(m.Content)
	if len(content) == 0 {
		content = []byte("{}")
	}
	frames := make([][]byte, 0, len(m.Idents)+6+len(m.Buffers))
	frames = append(frames, m.Idents...)
	frames = append(frames, delimiter, s.sign(header, parent, meta, content), header, parent, meta, content)
	frames = append(frames, m.Buffers...)
	return frames, nil
}

// isoDate formats t the way Jupyter expects (ISO 8601, UTC, microseconds).
func isoDate(t time.Time) string {
	return t.UTC().Format("2006-01-02T15:04:05.000000Z")
}

// newHeader returns a fresh header of the given type for session.
func newHeader(msgType, session string) Header {
	return Header{
		MsgID:    uuid.NewString(),
		Session:  session,
		Username: "kernel",
		Date:     isoDate(time.Now()),
		MsgType:  msgType,
		Version:  ProtocolVersion,
	}
}
