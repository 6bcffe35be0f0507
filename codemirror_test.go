package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"testing"

	"Nutate/dsl"
)

// codemirrorRunmode is CodeMirror 5's stand-alone tokeniser for node, as
// Debian's libjs-codemirror (a dependency of jupyter-notebook) installs it.
const codemirrorRunmode = "/usr/share/javascript/codemirror/addon/runmode/runmode.node.js"

// highlight runs kernel.js's mode over each text with CodeMirror's own runmode
// (under node) and returns, per text, the styled tokens as [text, style] pairs.
func highlight(t *testing.T, texts []string) [][][2]string {
	t.Helper()
	node, err := exec.LookPath("node")
	if _, serr := os.Stat(codemirrorRunmode); err != nil || serr != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI=true and node or CodeMirror's runmode is missing (%v, %v)", err, serr)
		}
		t.Skipf("node or %s not available (%v, %v); install nodejs and jupyter-notebook", codemirrorRunmode, err, serr)
	}
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "kernel.js"), kernelJS(), 0o644); err != nil {
		t.Fatal(err)
	}
	in, _ := json.Marshal(texts)
	if err := os.WriteFile(filepath.Join(dir, "in.json"), in, 0o644); err != nil {
		t.Fatal(err)
	}
	driver := `
const CM = require(` + jsString(codemirrorRunmode) + `);
const fs = require("fs");
let mod;
global.define = (deps, f) => { mod = f(CM, {}, {}); };
require(process.argv[process.argv.length - 1] + "/kernel.js");
if (!mod || typeof mod.onload !== "function") throw new Error("kernel.js: no AMD module with onload");
mod.onload();
const out = JSON.parse(fs.readFileSync(process.argv[process.argv.length - 1] + "/in.json", "utf8")).map(text => {
  const toks = [];
  CM.runMode(text, "text/x-nutate", (s, style) => { if (s.trim() !== "") toks.push([s, style || ""]); });
  return toks;
});
process.stdout.write(JSON.stringify(out));
`
	cmd := exec.Command(node, "-e", driver, "--", dir)
	out, err := cmd.Output()
	if err != nil {
		var stderr []byte
		if ee, ok := err.(*exec.ExitError); ok {
			stderr = ee.Stderr
		}
		t.Fatalf("node: %v\n%s", err, stderr)
	}
	var toks [][][2]string
	if err := json.Unmarshal(out, &toks); err != nil {
		t.Fatalf("node output: %v\n%s", err, out)
	}
	return toks
}

func jsString(s string) string { b, _ := json.Marshal(s); return string(b) }

// TestKernelJSHighlightsEveryWord: the classic-Notebook mode in kernel.js,
// run by CodeMirror itself, gives every word of the language's own tables its
// style (so a new statement, shape or unit is highlighted without an edit),
// numbers, strings and comments theirs, and leaves user names plain.
func TestKernelJSHighlightsEveryWord(t *testing.T) {
	v := dsl.Words()
	type want struct{ text, style string }
	var texts []string
	var wants [][]want
	add := func(text string, w ...want) { texts = append(texts, text); wants = append(wants, w) }
	for _, k := range v.Keywords {
		add(k+" x", want{k, "keyword"}, want{"x", "variable"})
	}
	for _, s := range v.Shapes {
		add("pulse p = "+s+"(duration = 2 ms)", want{"pulse", "keyword"}, want{"p", "variable"}, want{s, "builtin"},
			want{"duration", "property"}, want{"2", "number"}, want{"ms", "atom"})
	}
	for _, u := range v.Units {
		add("let a = 2.5 "+u, want{"let", "keyword"}, want{"2.5", "number"}, want{u, "atom"})
		add("let a = 3"+u+" # c", want{"3", "number"}, want{u, "atom"}, want{"# c", "comment"})
		add("print a in "+u, want{"print", "keyword"}, want{"in", "keyword"}, want{u, "atom"})
	}
	for _, n := range v.Names {
		add("sweep p over "+n, want{"sweep", "keyword"}, want{"over", "keyword"}, want{n, "property"})
	}
	add(`export p to "a # b.csv" # note`, want{"export", "keyword"}, want{`"a # b.csv"`, "string"}, want{"# note", "comment"})
	add("let m = 1e-3", want{"1e-3", "number"})
	add("let ms2 = 5 mm", want{"ms2", "variable"}, want{"mm", "atom"}) // a name is not a unit

	got := highlight(t, texts)
	if len(got) != len(texts) {
		t.Fatalf("got %d tokenised texts, want %d", len(got), len(texts))
	}
	for i, text := range texts {
		for _, w := range wants[i] {
			found := false
			for _, tok := range got[i] {
				if tok[0] == w.text {
					found = true
					if tok[1] != w.style {
						t.Errorf("%q: %q styled %q, want %q (tokens %v)", text, w.text, tok[1], w.style, got[i])
					}
					break
				}
			}
			if !found {
				t.Errorf("%q: no token %q (tokens %v)", text, w.text, got[i])
			}
		}
	}
}

// TestVocabularyClasses: every statement of the language (LANGUAGE.md) is a
// keyword, and no word is in two classes.
func TestVocabularyClasses(t *testing.T) {
	v := dsl.Words()
	class := map[string]string{}
	for name, list := range map[string][]string{"keyword": v.Keywords, "shape": v.Shapes, "unit": v.Units, "name": v.Names} {
		if len(list) == 0 {
			t.Errorf("%s list empty", name)
		}
		for _, w := range list {
			if name != "unit" {
				if c, dup := class[w]; dup {
					t.Errorf("%q is both %s and %s", w, c, name)
				}
				class[w] = name
			}
		}
	}
	for _, k := range []string{"nucleus", "field", "let", "pulse", "describe", "sweep", "print", "export", "import", "report", "help", "reset"} {
		if class[k] != "keyword" {
			t.Errorf("statement %q: got class %q, want keyword", k, class[k])
		}
	}
}
