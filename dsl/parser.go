package dsl

import (
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// statementKeywords start statements; each has a parse function below.
var statementKeywords = []string{"nucleus", "field", "let", "pulse", "describe", "sweep", "print", "export", "import", "report", "help", "reset"}

// reservedWords may not name a quantity or a pulse: statement keywords and the
// words that join a statement's parts.
var reservedWords = append([]string{"in", "to", "at", "over", "show", "with", "points", "step", "as", "from"}, statementKeywords...)

func isReserved(s string) bool {
	for _, w := range reservedWords {
		if w == s {
			return true
		}
	}
	return false
}

// parser builds statements from tokens. A fault abandons the statement (one error
// per line) and parsing resumes at the next statement.
type parser struct {
	src   string
	toks  []token
	i     int
	errs  *errorList
	depth int // nesting of expressions, bounded so that no input exhausts the stack
	bad   int // offset where the first faulty statement starts; -1: none
}

// maxNesting bounds parentheses and unary signs in one expression.
const maxNesting = 100

type bailout struct{}

func parse(src string) ([]Stmt, []*Error) {
	stmts, errs, _ := parseCell(src)
	return stmts, errs
}

// parseCell parses src and also returns cut, the offset before which every
// statement parsed cleanly (len(src) when there are no errors): the statements
// that start before cut may run although the cell has syntax errors.
func parseCell(src string) (stmts []Stmt, errs []*Error, cut int) {
	el := &errorList{src: src}
	toks := tokenize(src, el)
	scanErrs := sortErrors(el.errs)
	p := &parser{src: src, toks: toks, errs: el, bad: -1}
	stmts = p.statements()
	errs = sortErrors(el.errs)
	cut = len(src)
	if p.bad >= 0 {
		cut = p.bad // the first statement that did not parse (`;` keeps those before it on its line)
	}
	if len(scanErrs) > 0 {
		// A scanner fault belongs to no statement: cut at the start of its line.
		cut = min(cut, strings.LastIndexByte(src[:min(scanErrs[0].Pos.Offset, len(src))], '\n')+1)
	}
	return stmts, errs, cut
}

func (p *parser) statements() []Stmt {
	var stmts []Stmt
	for p.tok().Kind != tEOF {
		if p.tok().Kind == tNewline {
			p.i++
			continue
		}
		if s := p.statement(); s != nil {
			stmts = append(stmts, s)
		}
	}
	return stmts
}

func (p *parser) tok() token { return p.toks[p.i] }

func (p *parser) peek(k int) token {
	if p.i+k < len(p.toks) {
		return p.toks[p.i+k]
	}
	return p.toks[len(p.toks)-1]
}

func (p *parser) fail(pos Pos, format string, args ...any) {
	p.errs.add(pos, format, args...)
	panic(bailout{})
}

func (p *parser) expected(what string) {
	t := p.tok()
	pos := t.Pos
	if t.Kind == tEOF && p.i > 0 {
		// Point just after the last token, inside the input, not at a line
		// past its end.
		prev := p.toks[p.i-1]
		pos = Pos{prev.End, prev.Pos.Line, prev.Pos.Col + utf8.RuneCountInString(prev.Text)}
	}
	p.fail(pos, "expected %s, got %s", what, t.describe())
}

func (p *parser) isWord(w string) bool {
	t := p.tok()
	return t.Kind == tIdent && t.Text == w
}

func (p *parser) word(w string) token {
	if !p.isWord(w) {
		p.expected("`" + w + "`")
	}
	t := p.tok()
	p.i++
	return t
}

func (p *parser) expect(k tokKind, what string) token {
	if p.tok().Kind != k {
		p.expected(what)
	}
	t := p.tok()
	p.i++
	return t
}

func (p *parser) ident(what string) Ident {
	t := p.tok()
	if t.Kind != tIdent {
		p.expected(what)
	}
	p.i++
	return Ident{P: t.Pos, Name: t.Text}
}

// newName reads a name being defined; keywords are refused.
func (p *parser) newName(what string) Ident {
	id := p.ident(what)
	if isReserved(id.Name) {
		noun := "quantity"
		if strings.Contains(what, "pulse") {
			noun = "pulse"
		}
		p.fail(id.P, "%s is a keyword and cannot name a %s", quoteText(id.Name), noun)
	}
	return id
}

func (p *parser) endStatement() {
	switch p.tok().Kind {
	case tNewline:
		p.i++
	case tEOF:
	default:
		p.expected("end of statement")
	}
}

func (p *parser) skipStatement() {
	for p.tok().Kind != tNewline && p.tok().Kind != tEOF {
		p.i++
	}
}

func (p *parser) statement() (s Stmt) {
	start := p.tok().Pos.Offset
	defer func() {
		if r := recover(); r != nil {
			if _, ok := r.(bailout); !ok {
				panic(r)
			}
			if p.bad < 0 {
				p.bad = start
			}
			s = nil
			p.skipStatement()
		}
	}()
	t := p.tok()
	if t.Kind != tIdent {
		p.expected("a statement (" + strings.Join(statementKeywords, ", ") + ")")
	}
	p.i++
	switch t.Text {
	case "nucleus":
		s = p.nucleus(t)
	case "field":
		s = &FieldStmt{P: t.Pos, X: p.expr()}
	case "let":
		s = p.let(t)
	case "pulse":
		s = p.pulse(t)
	case "describe":
		s = p.describe(t)
	case "sweep":
		s = p.sweep(t)
	case "print":
		s = p.print(t)
	case "export":
		s = p.export(t)
	case "import":
		s = p.importStmt(t)
	case "report":
		s = p.report(t)
	case "help":
		s = p.help(t)
	case "reset":
		s = &ResetStmt{P: t.Pos}
	default:
		p.i--
		msg := "expected a statement (" + strings.Join(statementKeywords, ", ") + "), got " + t.describe()
		if p.peek(1).Kind == tAssign {
			msg += "; to name a quantity write `let " + t.Text + " = ...`, a pulse `pulse " + t.Text + " = ...`"
		} else {
			msg += suggest(t.Text, statementKeywords)
		}
		p.fail(t.Pos, "%s", msg)
	}
	p.endStatement()
	return s
}

// nucleus := "nucleus" NUCLEUS   (NUCLEUS is a mass number glued to a symbol: 31P)
func (p *parser) nucleus(kw token) Stmt {
	t := p.tok()
	switch {
	case t.Kind == tNumber && p.peek(1).Kind == tIdent && p.peek(1).Pos.Offset == t.End:
		p.i += 2
		return &NucleusStmt{P: kw.Pos, Name: t.Text + p.peek(-1).Text, NameP: t.Pos}
	case t.Kind == tIdent:
		p.i++
		return &NucleusStmt{P: kw.Pos, Name: t.Text, NameP: t.Pos}
	}
	p.expected("a nucleus such as 1H or 31P")
	return nil
}

// let := "let" NAME "=" EXPR
func (p *parser) let(kw token) Stmt {
	name := p.newName("a name")
	p.expect(tAssign, "`=`")
	return &LetStmt{P: kw.Pos, Name: name, X: p.expr()}
}

// pulse := "pulse" NAME "=" (SHAPE | PULSE) ["(" ARGS ")"]
func (p *parser) pulse(kw token) Stmt {
	name := p.newName("a pulse name")
	p.expect(tAssign, "`=`")
	fun := p.ident("a shape (rect, sinc, ...) or a pulse to copy")
	call := &Call{Fun: fun, Rparen: fun.P}
	if p.tok().Kind == tLParen {
		call = p.call(fun)
	}
	return &PulseStmt{P: kw.Pos, Name: name, Call: call}
}

// names := NAME {"," NAME}
func (p *parser) names(what string) []Ident {
	out := []Ident{p.ident(what)}
	for p.tok().Kind == tComma {
		p.i++
		out = append(out, p.ident(what))
	}
	return out
}

// settings := SETTING "=" EXPR {"," SETTING "=" EXPR}
func (p *parser) settings() []Setting {
	var out []Setting
	for {
		name := p.ident("a setting (" + strings.Join(settingNames(), ", ") + ")")
		p.expect(tAssign, "`=` after "+name.Name)
		out = append(out, Setting{Name: name, Value: p.expr()})
		if p.tok().Kind != tComma {
			return out
		}
		p.i++
	}
}

// describe := "describe" NAMES ["with" SETTINGS]
func (p *parser) describe(kw token) Stmt {
	s := &DescribeStmt{P: kw.Pos, Names: p.names("a pulse name")}
	if p.isWord("with") {
		p.i++
		s.With = p.settings()
	}
	return s
}

// sweep := "sweep" NAMES "over" AXIS ["," AXIS] ["show" NAMES] ["with" SETTINGS]
// AXIS  := KIND EXPR "to" EXPR ("points" EXPR | "step" EXPR)
func (p *parser) sweep(kw token) Stmt {
	s := &SweepStmt{P: kw.Pos, Names: p.names("a pulse name")}
	p.word("over")
	for {
		var a Axis
		a.Kind = p.ident("an axis (offset, b1, position, t1, t2 or a shape argument)")
		if isReserved(a.Kind.Name) {
			p.fail(a.Kind.P, "expected an axis (offset, b1, position, t1, t2 or a shape argument), got %s", quoteText(a.Kind.Name))
		}
		a.From = p.expr()
		p.word("to")
		a.To = p.expr()
		switch {
		case p.isWord("points"):
			p.i++
			a.Points = p.expr()
		case p.isWord("step"):
			p.i++
			a.Step = p.expr()
		default:
			p.expected("`points N` or `step S`")
		}
		s.Axes = append(s.Axes, a)
		if p.tok().Kind != tComma {
			break
		}
		p.i++
		if len(s.Axes) == 2 {
			p.fail(p.tok().Pos, "a sweep takes at most two axes")
		}
	}
	for p.isWord("show") || p.isWord("with") {
		t := p.tok()
		p.i++
		if t.Text == "show" {
			if s.Show != nil {
				p.fail(t.Pos, "`show` given twice")
			}
			s.Show = p.names("a quantity (" + strings.Join(quantityNames(), ", ") + ")")
		} else {
			if s.With != nil {
				p.fail(t.Pos, "`with` given twice")
			}
			s.With = p.settings()
		}
	}
	return s
}

// print := "print" EXPR {"," EXPR}
func (p *parser) print(kw token) Stmt {
	s := &PrintStmt{P: kw.Pos, Xs: []Expr{p.expr()}}
	for p.tok().Kind == tComma {
		p.i++
		s.Xs = append(s.Xs, p.expr())
	}
	return s
}

func (p *parser) str() (string, Pos) {
	t := p.expect(tString, "a file name in double quotes")
	return t.Text[1 : len(t.Text)-1], t.Pos
}

// export := "export" (NAME | "sweep" | "figure") "to" STRING
func (p *parser) export(kw token) Stmt {
	name := p.ident("a pulse name, `sweep` for the last sweep's data or `figure` for the last figure")
	p.word("to")
	path, pp := p.str()
	return &ExportStmt{P: kw.Pos, Name: name, Path: path, PathP: pp}
}

// import := "import" NAME "from" STRING ["with" SETTINGS]
func (p *parser) importStmt(kw token) Stmt {
	name := p.newName("a pulse name")
	p.word("from")
	path, pp := p.str()
	s := &ImportStmt{P: kw.Pos, Name: name, Path: path, PathP: pp}
	if p.isWord("with") {
		p.i++
		s.With = p.settings()
	}
	return s
}

// report := "report" NAMES ["as" ("markdown" | "latex")]
func (p *parser) report(kw token) Stmt {
	s := &ReportStmt{P: kw.Pos, Names: p.names("a pulse name")}
	if p.isWord("as") {
		p.i++
		f := p.ident("`markdown` or `latex`")
		if f.Name != "markdown" && f.Name != "latex" {
			p.fail(f.P, "expected `markdown` or `latex`, got %s%s", quoteText(f.Name), suggest(f.Name, []string{"markdown", "latex"}))
		}
		s.Format = &f
	}
	return s
}

// help := "help" [TOPIC]   (TOPIC is the rest of the statement)
func (p *parser) help(kw token) Stmt {
	s := &HelpStmt{P: kw.Pos}
	start := p.tok()
	end := start.Pos.Offset
	for p.tok().Kind != tNewline && p.tok().Kind != tEOF {
		end = p.tok().End
		p.i++
	}
	if end > start.Pos.Offset {
		s.Topic = strings.TrimSpace(p.src[start.Pos.Offset:end])
		s.TopicP = start.Pos
	}
	return s
}

// call := NAME "(" [ARG {"," ARG}] ")"
// ARG  := NAME "=" EXPR | EXPR ["at" EXPR]
func (p *parser) call(fun Ident) *Call {
	c := &Call{Fun: fun}
	open := p.expect(tLParen, "`(`")
	defer p.unclosed(open)
	for p.tok().Kind != tRParen {
		a := &Arg{}
		if p.tok().Kind == tIdent && p.peek(1).Kind == tAssign {
			id := p.ident("an argument name")
			a.Name = &id
			p.i++
			a.Value = p.expr()
		} else {
			a.Value = p.expr()
			if p.isWord("at") {
				p.i++
				a.At = p.expr()
			}
		}
		c.Args = append(c.Args, a)
		if p.tok().Kind == tComma {
			p.i++
			continue
		}
		if p.tok().Kind != tRParen {
			p.expected("`,` or `)`")
		}
	}
	c.Rparen = p.tok().Pos
	p.i++
	return c
}

// expr := sum ["in" UNIT]
func (p *parser) expr() Expr {
	p.nest()
	defer func() { p.depth-- }()
	x := p.sum()
	if p.isWord("in") {
		t := p.tok()
		p.i++
		u := p.unit(true)
		return &Convert{P: t.Pos, X: x, Unit: *u}
	}
	return x
}

// terms bounds the length of a chain of operators (the evaluator recurses along it).
func (p *parser) terms(n int) {
	if n >= maxTerms {
		p.fail(p.tok().Pos, "expression has more than %d terms", maxTerms)
	}
}

// maxTerms bounds a chain of + - or * / in one expression.
const maxTerms = 1000

func (p *parser) nest() {
	if p.depth++; p.depth > maxNesting {
		p.fail(p.tok().Pos, "expression nested more than %d deep", maxNesting)
	}
}

// sum := product {("+" | "-") product}
func (p *parser) sum() Expr { return p.chain(p.product, tPlus, tMinus) }

// product := unary {("*" | "/") unary}
func (p *parser) product() Expr { return p.chain(p.unary, tStar, tSlash) }

// chain := operand {(op1 | op2) operand}, grouped from the left.
func (p *parser) chain(operand func() Expr, op1, op2 tokKind) Expr {
	x := operand()
	for n := 0; p.tok().Kind == op1 || p.tok().Kind == op2; n++ {
		t := p.tok()
		p.terms(n)
		p.i++
		x = &Binary{P: t.Pos, Op: t.Kind, X: x, Y: operand()}
	}
	return x
}

// unary := ("-" | "+") unary | primary
func (p *parser) unary() Expr {
	if t := p.tok(); t.Kind == tMinus || t.Kind == tPlus {
		p.i++
		p.nest()
		defer func() { p.depth-- }()
		return &Unary{P: t.Pos, Op: t.Kind, X: p.unary()}
	}
	return p.primary()
}

// piName is the constant π, written like a number: `pi/2`, `pi rad`.
const piName = "pi"

// primary := (NUMBER | "pi") [UNIT] | NAME [call] | "(" expr ")"
func (p *parser) primary() Expr {
	t := p.tok()
	switch t.Kind {
	case tNumber:
		p.i++
		v, err := strconv.ParseFloat(t.Text, 64)
		if err != nil {
			p.fail(t.Pos, "number %s is out of range", t.Text)
		}
		n := &Number{P: t.Pos, Text: t.Text, Value: v}
		n.Unit = p.unit(false)
		return n
	case tIdent:
		if isReserved(t.Text) {
			p.expected("a value")
		}
		p.i++
		if t.Text == piName && p.tok().Kind != tLParen {
			// The constant π, which may take a unit like a number (`pi rad`).
			n := &Number{P: t.Pos, Text: t.Text, Value: math.Pi}
			n.Unit = p.unit(false)
			return n
		}
		id := Ident{P: t.Pos, Name: t.Text}
		if p.tok().Kind == tLParen {
			return p.call(id)
		}
		return &id
	case tLParen:
		p.i++
		defer p.unclosed(t)
		x := p.expr()
		p.expect(tRParen, "`)`")
		return x
	}
	p.expected("a value")
	return nil
}

// unit reads a unit after a number (optional) or after `in` (required). Compound
// units (mT/m, G/cm) are three adjacent tokens.
func (p *parser) unit(required bool) *UnitRef {
	t := p.tok()
	if t.Kind == tPercent {
		p.i++
		return &UnitRef{P: t.Pos, Name: "%"}
	}
	if t.Kind != tIdent || isReserved(t.Text) {
		if required {
			p.expected("a unit (" + strings.Join(unitNames(), " ") + ")")
		}
		return nil
	}
	if sl, u2 := p.peek(1), p.peek(2); sl.Kind == tSlash && sl.Pos.Offset == t.End && u2.Kind == tIdent && u2.Pos.Offset == sl.End {
		if _, ok := lookupUnit(t.Text + "/" + u2.Text); ok {
			p.i += 3
			return &UnitRef{P: t.Pos, Name: t.Text + "/" + u2.Text}
		}
	}
	if _, ok := lookupUnit(t.Text); !ok {
		if !required && p.peek(1).Kind == tAssign {
			// A named argument follows without a comma; let the caller complain.
			return nil
		}
		p.fail(t.Pos, "unknown unit %s%s", quoteText(t.Text), suggestUnit(t.Text))
	}
	p.i++
	return &UnitRef{P: t.Pos, Name: t.Text}
}

// unclosed, deferred by a parse function that read the `(` open, turns a fault at
// the end of the statement or past the line of an unclosed `(` into one at the `(`.
func (p *parser) unclosed(open token) {
	r := recover()
	if r == nil {
		return
	}
	if _, ok := r.(bailout); ok && len(p.errs.errs) > 0 {
		last := p.errs.errs[len(p.errs.errs)-1]
		t := p.tok()
		if (t.Kind == tEOF || t.Kind == tNewline || last.Pos.Line > open.Pos.Line) && !p.closedLater(open) {
			p.errs.errs = p.errs.errs[:len(p.errs.errs)-1]
			p.errs.add(open.Pos, "`(` is never closed: expected `)`")
		}
	}
	panic(r)
}

// closedLater reports whether the `(` at open has a matching `)` in its statement.
func (p *parser) closedLater(open token) bool {
	depth := 0
	for _, t := range p.toks {
		if t.Pos.Offset < open.Pos.Offset {
			continue
		}
		switch t.Kind {
		case tNewline, tEOF:
			return false
		case tLParen:
			depth++
		case tRParen:
			depth--
			if depth == 0 {
				return true
			}
		}
	}
	return false
}
