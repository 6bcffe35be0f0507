package dsl

import (
	"sort"
	"strings"

	"Nutate/physics"
)

func isWordRune(r rune) bool { return isIdentPart(r) || r == '°' || r == '/' }

// wordAt returns the rune range of the word around cursor.
func wordAt(rs []rune, cursor int) (int, int) {
	cursor = max(0, min(cursor, len(rs)))
	start, end := cursor, cursor
	for start > 0 && isWordRune(rs[start-1]) {
		start--
	}
	for end < len(rs) && isWordRune(rs[end]) {
		end++
	}
	return start, end
}

// Complete returns the candidates for the word at cursor (a rune offset) by
// context: statement keywords at the start of a statement, shapes and pulses after
// `pulse NAME =`, argument names inside a shape call, words for word arguments,
// quantities after `show`, settings after `with`, axes after `over`, units after a
// number or `in`, pulse and quantity names elsewhere. It also returns the rune
// range the candidate replaces.
func (s *Session) Complete(code string, cursor int) ([]string, int, int) {
	rs := []rune(code)
	start, end := wordAt(rs, cursor)
	// A unit glued to a number (`250u`): complete the unit only. A nuclide
	// (`13C`) is one word: `nucleus 13` completes to 13C as a whole.
	if st := stmtTokens(string(rs[:start])); start < len(rs) && rs[start] >= '0' && rs[start] <= '9' && !(len(st) > 0 && st[0].Text == "nucleus") {
		errs := &errorList{}
		sc := newScanner(string(rs[start:end]), errs)
		if t := sc.next(); t.Kind == tNumber {
			start += len([]rune(t.Text))
		}
	}
	prefix := string(rs[start:min(max(cursor, start), len(rs))])
	before := string(rs[:start])
	cands := completer{s.state()}.candidates(before, prefix)
	var out []string
	seen := map[string]bool{}
	for _, c := range cands {
		if strings.HasPrefix(c, prefix) && !seen[c] && c != "" {
			seen[c] = true
			out = append(out, c)
		}
	}
	sort.Strings(out)
	return out, start, end
}

// stmtTokens returns the tokens of the statement that the text ends in.
func stmtTokens(before string) []token {
	errs := &errorList{src: before}
	toks := tokenize(before, errs)
	toks = toks[:len(toks)-1] // EOF
	for i := len(toks) - 1; i >= 0; i-- {
		if toks[i].Kind == tNewline {
			return toks[i+1:]
		}
	}
	return toks
}

func (c completer) candidates(before, prefix string) []string {
	toks := stmtTokens(before)
	// The word being completed may be glued to a number: `250u`.
	if len(toks) > 0 && toks[len(toks)-1].Kind == tNumber && toks[len(toks)-1].End == len(before) && prefix != "" {
		if len(toks) >= 2 && toks[0].Text == "nucleus" {
			return nucleusNames()
		}
		return unitNames()
	}
	if len(toks) == 0 {
		return statementKeywords
	}
	first := toks[0].Text
	last := toks[len(toks)-1]
	switch first {
	case "nucleus":
		return nucleusNames()
	case "help":
		return helpWords()
	case "reset":
		return nil
	}
	if last.Kind == tIdent && (first == "export" && last.Text == "to" || first == "import" && last.Text == "from") ||
		last.Kind == tIllegal && strings.HasPrefix(last.Text, `"`) {
		return nil // a file name: nothing of the session fits there
	}
	if last.Kind == tNumber && len(toks) >= 2 && toks[len(toks)-2].Text == "points" {
		return []string{"show", "with"} // a count takes no unit
	}
	if last.Kind == tNumber {
		return append(unitNames(), "to", "points", "step", "show", "with", "at", "in")
	}
	if last.Kind == tIdent && last.Text == "in" {
		return unitNames()
	}
	// Inside a call: find the innermost open parenthesis.
	depth := 0
	open := -1
	for i := len(toks) - 1; i >= 0; i-- {
		switch toks[i].Kind {
		case tRParen:
			depth++
		case tLParen:
			if depth == 0 {
				open = i
			} else {
				depth--
			}
		}
		if open >= 0 {
			break
		}
	}
	if open > 0 && toks[open-1].Kind == tIdent {
		fn := toks[open-1].Text
		if last.Kind == tLParen || last.Kind == tComma {
			return c.callArgNames(fn)
		}
		if last.Kind == tAssign && len(toks) >= 2 && toks[len(toks)-2].Kind == tIdent {
			if words := c.argWords(fn, toks[len(toks)-2].Text); words != nil {
				return words
			}
		}
		return c.valueNames()
	}
	if first == "pulse" && last.Kind == tAssign && len(toks) == 3 {
		return append(shapeNames(), c.st.pulseNames()...)
	}
	if first == "report" && last.Kind == tIdent && last.Text == "as" {
		return []string{"markdown", "latex"}
	}
	// Find the last clause word of a sweep/describe/import.
	clause := ""
	for _, t := range toks {
		if t.Kind == tIdent && contains([]string{"over", "show", "with"}, t.Text) {
			clause = t.Text
		}
	}
	afterSep := last.Kind == tComma || (last.Kind == tIdent && contains([]string{"over", "show", "with"}, last.Text))
	if clause != "" && afterSep {
		switch clause {
		case "over":
			return c.axisNames(toks)
		case "show":
			return quantityNames()
		case "with":
			if first == "import" {
				return importSettings
			}
			if first == "describe" {
				return []string{"tr"}
			}
			return settingNames()
		}
	}
	if clause == "with" && last.Kind == tAssign && len(toks) >= 2 && toks[len(toks)-2].Text == "start" {
		return []string{"z", "-z", "x", "y"}
	}
	if clause == "with" && last.Kind == tAssign && len(toks) >= 2 && toks[len(toks)-2].Text == "role" {
		return []string{"excite", "invert", "refocus", "saturate"}
	}
	if first == "report" && clause == "" && len(toks) >= 2 && last.Kind == tIdent && !(len(toks) == 2 && prefix != "") {
		return []string{"as"}
	}
	if first == "sweep" && clause == "over" && last.Kind == tIdent {
		if _, ok := lookupUnit(last.Text); ok {
			return []string{"to", "points", "step", "show", "with", "in"}
		}
	}
	if first == "export" && len(toks) == 1 {
		return append(c.st.pulseNames(), "sweep", "figure")
	}
	if first == "export" && len(toks) == 2 && last.Kind == tIdent {
		return []string{"to"}
	}
	if contains([]string{"describe", "sweep", "report", "export"}, first) && (len(toks) == 1 || last.Kind == tComma && clause == "") {
		return c.st.pulseNames()
	}
	if last.Kind == tIdent && (first == "sweep" || first == "describe") && clause == "" {
		if first == "sweep" {
			return []string{"over"}
		}
		return []string{"with"}
	}
	return c.valueNames()
}

// completer finds candidates against one committed state.
type completer struct{ st *state }

func nucleusNames() []string { return strings.Fields(physics.NucleusNames()) }

func (c completer) valueNames() []string {
	out := []string{piName}
	for n, b := range c.st.names {
		if b.pulse == nil {
			out = append(out, n)
		}
	}
	return out
}

// specFor finds the shape row behind a call name: a shape or a pulse to copy.
func (c completer) specFor(fn string) *shapeSpec {
	if sp, ok := lookupShape(fn); ok {
		return sp
	}
	if b, ok := c.st.names[fn]; ok && b.pulse != nil {
		return b.pulse.Spec
	}
	return nil
}

func (c completer) callArgNames(fn string) []string {
	if fn == "train" {
		return append(append(argNamesOf(trainArgs), shapeNames()...), c.st.pulseNames()...)
	}
	if sp := c.specFor(fn); sp != nil {
		return sp.argNames()
	}
	return nil
}

func (c completer) argWords(fn, arg string) []string {
	if fn == "train" {
		for _, a := range trainArgs {
			if a.Name == arg {
				return a.Words
			}
		}
		return nil
	}
	if sp := c.specFor(fn); sp != nil {
		if a, ok := sp.arg(arg); ok && a.Kind == argWord {
			return a.Words
		}
	}
	return nil
}

func (c completer) axisNames(toks []token) []string {
	out := spinAxisNames()
	for _, t := range toks[1:] {
		if t.Kind == tIdent && t.Text == "over" {
			break
		}
		if b, ok := c.st.names[t.Text]; ok && b.pulse != nil && b.pulse.Spec != nil {
			for _, a := range b.pulse.Spec.allArgs() {
				if a.Kind != argWord {
					out = append(out, a.Name)
				}
			}
		}
	}
	return out
}

// Inspect returns the help text for the word at cursor: a statement, shape,
// argument, quantity, setting, unit or nucleus, or a name defined in the session.
func (s *Session) Inspect(code string, cursor int) (string, bool) {
	rs := []rune(code)
	start, end := wordAt(rs, cursor)
	if start == end && start > 0 {
		start, end = wordAt(rs, start-1)
	}
	if _, nuclide := physics.Lookup(string(rs[start:end])); start < end && rs[start] >= '0' && rs[start] <= '9' && !nuclide {
		sc := newScanner(string(rs[start:end]), &errorList{})
		if t := sc.next(); t.Kind == tNumber {
			start += len([]rune(t.Text))
		}
	}
	w := string(rs[start:end])
	if w == "" {
		return "", false
	}
	var parts []string
	if b, ok := s.state().names[w]; ok {
		if b.pulse != nil {
			parts = append(parts, pulseSummary(b.pulse))
		} else {
			parts = append(parts, w+" = "+b.val.String())
		}
	}
	if text, ok := wordHelp(w); ok {
		parts = append(parts, text)
	}
	if len(parts) == 0 {
		return "", false
	}
	return strings.Join(parts, "\n\n"), true
}

// Vocabulary is the language's words by kind, taken from the tables the parser
// and evaluator use, for editors' syntax highlighting (the kernelspec's
// CodeMirror mode is written from it, so the two cannot drift apart).
type Vocabulary struct {
	Keywords   []string // statements and the words of their clauses (reserved)
	Shapes     []string // pulse shapes (train among them)
	Units      []string // unit spellings, written after a number or `in`
	Names      []string // arguments, quantities, settings and axes
	Comment    string   // starts a comment that runs to the end of the line
	StringQuot string   // opens and closes a string on one line
}

// Words returns the language's Vocabulary, each list sorted.
func Words() Vocabulary {
	names := map[string]bool{}
	add := func(ws ...string) {
		for _, w := range ws {
			names[w] = true
		}
	}
	for _, s := range shapes {
		add(argNamesOf(s.allArgs())...)
	}
	add(argNamesOf(trainArgs)...)
	add(quantityNames()...)
	for _, s := range settingTable {
		add(s.Name)
	}
	add(spinAxisNames()...)
	shapeList := shapeNames()
	keywords := append([]string{}, reservedWords...)
	for _, w := range append(append([]string{}, keywords...), shapeList...) {
		delete(names, w)
	}
	v := Vocabulary{
		Keywords:   keywords,
		Shapes:     shapeList,
		Units:      unitNames(),
		Comment:    "#",
		StringQuot: `"`,
	}
	for n := range names {
		v.Names = append(v.Names, n)
	}
	for _, l := range [][]string{v.Keywords, v.Shapes, v.Units, v.Names} {
		sort.Strings(l)
	}
	return v
}
