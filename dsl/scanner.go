package dsl

import (
	"strings"
	"unicode"
	"unicode/utf8"
)

// Pos is a position in a cell: byte offset, 1-based line and 1-based column
// counted in runes.
type Pos struct {
	Offset, Line, Col int
}

// tokKind is the kind of a token.
type tokKind int

const (
	tEOF tokKind = iota
	tNewline
	tIdent
	tNumber
	tString
	tLParen
	tRParen
	tComma
	tAssign
	tPlus
	tMinus
	tStar
	tSlash
	tPercent
	tIllegal
)

var tokNames = [...]string{
	tEOF: "end of input", tNewline: "end of line", tIdent: "name", tNumber: "number",
	tString: "string", tLParen: "(", tRParen: ")", tComma: ",", tAssign: "=",
	tPlus: "+", tMinus: "-", tStar: "*", tSlash: "/", tPercent: "%", tIllegal: "character",
}

func (k tokKind) String() string { return tokNames[k] }

// token is one lexeme with its position and exact text. End is the byte offset just
// past it.
type token struct {
	Kind tokKind
	Pos  Pos
	End  int
	Text string
}

func (t token) describe() string {
	switch t.Kind {
	case tNewline:
		if t.Text == ";" {
			return "`;` (end of statement)"
		}
		return t.Kind.String()
	case tEOF:
		return t.Kind.String()
	case tString:
		return "string " + t.Text
	case tIllegal:
		return "character " + quoteText(t.Text)
	}
	return quoteText(t.Text)
}

func quoteText(s string) string { return "`" + s + "`" }

// scanner turns a cell into tokens. Newlines inside parentheses, and after a token
// that cannot end a statement (`,`, `=`, an operator), are skipped: the statement
// continues on the next line. `;` is a statement separator like a newline.
type scanner struct {
	src        string
	off        int
	line, col  int
	depth      int
	last       tokKind
	errs       *errorList
	unbalanced bool
}

func newScanner(src string, errs *errorList) *scanner {
	return &scanner{src: src, line: 1, col: 1, last: tNewline, errs: errs}
}

func (s *scanner) pos() Pos { return Pos{s.off, s.line, s.col} }

func (s *scanner) peekRune() (rune, int) {
	if s.off >= len(s.src) {
		return -1, 0
	}
	return utf8.DecodeRuneInString(s.src[s.off:])
}

func (s *scanner) advance() rune {
	r, n := s.peekRune()
	if n == 0 {
		return -1
	}
	s.off += n
	if r == '\n' {
		s.line++
		s.col = 1
	} else {
		s.col++
	}
	return r
}

func continues(k tokKind) bool {
	switch k {
	case tComma, tAssign, tPlus, tMinus, tStar, tSlash:
		return true
	}
	return false
}

func isIdentStart(r rune) bool {
	return r == '_' || unicode.IsLetter(r)
}

func isIdentPart(r rune) bool {
	return r == '_' || unicode.IsLetter(r) || unicode.IsDigit(r)
}

// next returns the next token.
func (s *scanner) next() token {
	t := s.scan()
	s.last = t.Kind
	return t
}

func (s *scanner) scan() token {
	for {
		r, _ := s.peekRune()
		switch {
		case r == '#':
			for r, _ := s.peekRune(); r != '\n' && r != -1; r, _ = s.peekRune() {
				s.advance()
			}
			continue
		case r == '\n' || r == ';':
			p := s.pos()
			s.advance()
			if r == '\n' && (s.depth > 0 || continues(s.last)) && s.last != tNewline && s.keywordLineFollows() {
				// A statement keyword cannot continue an expression: the line
				// before is unfinished and the parser says so there; an open `(`
				// is left to it as well, so that later lines parse on their own.
				s.depth = 0
				return token{Kind: tNewline, Pos: p, End: s.off, Text: string(r)}
			}
			if r == '\n' && (s.depth > 0 || continues(s.last) || s.last == tNewline) {
				continue
			}
			if s.last == tNewline {
				continue
			}
			return token{Kind: tNewline, Pos: p, End: s.off, Text: string(r)}
		case r == ' ' || r == '\t' || r == '\r' || r == '\v' || r == '\f' || r == 0xa0 || r == 0xfeff:
			s.advance()
			continue
		}
		break
	}
	p := s.pos()
	r, _ := s.peekRune()
	mk := func(k tokKind) token {
		return token{Kind: k, Pos: p, End: s.off, Text: s.src[p.Offset:s.off]}
	}
	switch {
	case r == -1:
		return token{Kind: tEOF, Pos: p, End: s.off}
	case r == utf8.RuneError:
		s.advance()
		t := mk(tIllegal)
		s.errs.add(p, "invalid UTF-8 in the source")
		return t
	case unicode.IsDigit(r) && r < 128, r == '.' && s.digitAfter(1):
		s.number()
		return mk(tNumber)
	case isIdentStart(r):
		for r, _ := s.peekRune(); isIdentPart(r); r, _ = s.peekRune() {
			s.advance()
		}
		return mk(tIdent)
	case r == '°':
		s.advance()
		return mk(tIdent)
	case r == '"':
		s.advance()
		for {
			r, _ := s.peekRune()
			if r == -1 || r == '\n' {
				s.errs.add(p, "string not terminated: want a closing \"")
				t := mk(tString)
				t.Kind = tIllegal
				return t
			}
			s.advance()
			if r == '"' {
				return mk(tString)
			}
		}
	}
	s.advance()
	switch r {
	case '(':
		s.depth++
		return mk(tLParen)
	case ')':
		if s.depth > 0 {
			s.depth--
		} else {
			s.unbalanced = true
		}
		return mk(tRParen)
	case ',':
		return mk(tComma)
	case '=':
		return mk(tAssign)
	case '+':
		return mk(tPlus)
	case '-', '−':
		return mk(tMinus)
	case '*', '×', '·':
		return mk(tStar)
	case '/':
		return mk(tSlash)
	case '%':
		return mk(tPercent)
	}
	return mk(tIllegal)
}

// keywordLineFollows reports whether the line starting at the current offset opens
// with a statement keyword.
func (s *scanner) keywordLineFollows() bool {
	rest := strings.TrimLeft(s.src[s.off:], " \t\r\v\f")
	n := 0
	for n < len(rest) {
		r, w := utf8.DecodeRuneInString(rest[n:])
		if !isIdentPart(r) || n == 0 && !isIdentStart(r) {
			break
		}
		n += w
	}
	for _, k := range statementKeywords {
		if rest[:n] == k {
			return true
		}
	}
	return false
}

func (s *scanner) digitAfter(k int) bool {
	i := s.off + k
	return i < len(s.src) && s.src[i] >= '0' && s.src[i] <= '9'
}

// number scans digits [. digits] [e [+-] digits]; an `e` not followed by digits is
// left for the next token (a unit or a nucleus name).
func (s *scanner) number() {
	for s.off < len(s.src) && s.src[s.off] >= '0' && s.src[s.off] <= '9' {
		s.advance()
	}
	if s.off < len(s.src) && s.src[s.off] == '.' {
		s.advance()
		for s.off < len(s.src) && s.src[s.off] >= '0' && s.src[s.off] <= '9' {
			s.advance()
		}
	}
	if s.off < len(s.src) && (s.src[s.off] == 'e' || s.src[s.off] == 'E') {
		k := 1
		if s.off+1 < len(s.src) && (s.src[s.off+1] == '+' || s.src[s.off+1] == '-') {
			k = 2
		}
		if s.digitAfter(k) {
			for range k {
				s.advance()
			}
			for s.off < len(s.src) && s.src[s.off] >= '0' && s.src[s.off] <= '9' {
				s.advance()
			}
		}
	}
}

// tokenize scans the whole cell.
func tokenize(src string, errs *errorList) []token {
	s := newScanner(src, errs)
	var out []token
	for {
		t := s.next()
		out = append(out, t)
		if t.Kind == tEOF {
			return out
		}
	}
}

// lineOf returns the source line holding offset (without its newline).
func lineOf(src string, off int) string {
	if off > len(src) {
		off = len(src)
	}
	start := strings.LastIndexByte(src[:off], '\n') + 1
	end := strings.IndexByte(src[off:], '\n')
	if end < 0 {
		end = len(src)
	} else {
		end += off
	}
	return strings.TrimRight(src[start:end], "\r")
}
