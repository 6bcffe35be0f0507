package dsl

import (
	"context"
	"errors"
	"flag"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"Nutate/display"
)

var update = flag.Bool("update", false, "rewrite the expected sections of testdata scripts")

// A testdata script is a sequence of sections, each opened by a line
// `-- KIND --` or `-- file NAME --`:
//
//	-- file NAME --   a file written into the session's folder before any cell runs
//	-- input --       a cell; successive inputs run in one session
//	-- output --      the cell's text/plain outputs, one bundle after another
//	-- error --       the cell's error traceback (absent: the cell must succeed)
//	-- match --       instead of output: one regular expression per output line,
//	                  for figures that belong to another package's design
//	                  (kept as written by -update)
//
// Text before the first section is a comment. With -update the output and error
// sections are rewritten from what the cells produce.
type section struct {
	kind, name, body string
}

func parseScript(text string) []section {
	var out []section
	for _, line := range strings.SplitAfter(text, "\n") {
		l := strings.TrimRight(line, "\n")
		if strings.HasPrefix(l, "-- ") && strings.HasSuffix(l, " --") && len(l) > 6 {
			f := strings.Fields(l[3 : len(l)-3])
			s := section{kind: f[0]}
			if len(f) > 1 {
				s.name = strings.Join(f[1:], " ")
			}
			out = append(out, s)
			continue
		}
		if len(out) > 0 {
			out[len(out)-1].body += line
		}
	}
	return out
}

func formatScript(comment string, secs []section) string {
	var b strings.Builder
	b.WriteString(comment)
	for _, s := range secs {
		b.WriteString("-- " + s.kind)
		if s.name != "" {
			b.WriteString(" " + s.name)
		}
		b.WriteString(" --\n" + s.body)
	}
	return b.String()
}

// runCell runs one cell and returns its plain-text outputs and error traceback.
func runCell(t *testing.T, s *Session, src string) (string, string) {
	t.Helper()
	var outs []string
	err := s.Exec(context.Background(), src, Sink{Display: func(b display.Bundle) {
		txt, ok := b["text/plain"].(string)
		if !ok {
			t.Errorf("bundle without text/plain: %v", b)
		}
		outs = append(outs, strings.TrimRight(txt, "\n"))
	}})
	out := ""
	if len(outs) > 0 {
		out = strings.Join(outs, "\n") + "\n"
	}
	if err == nil {
		return out, ""
	}
	var tb interface{ Traceback() []string }
	if !errors.As(err, &tb) {
		t.Fatalf("error without Traceback: %v", err)
	}
	return out, strings.Join(tb.Traceback(), "\n") + "\n"
}

func TestScripts(t *testing.T) {
	files, err := filepath.Glob("testdata/*.txt")
	if err != nil || len(files) == 0 {
		t.Fatalf("no testdata scripts: %v", err)
	}
	for _, file := range files {
		t.Run(strings.TrimSuffix(filepath.Base(file), ".txt"), func(t *testing.T) {
			data, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			text := string(data)
			comment := text
			if i := strings.Index(text, "\n-- "); i >= 0 {
				comment = text[:i+1]
			} else if strings.HasPrefix(text, "-- ") {
				comment = ""
			}
			secs := parseScript(text)
			dir := t.TempDir()
			s := NewSession(dir)
			for _, sec := range secs {
				if sec.kind == "file" {
					if err := os.WriteFile(filepath.Join(dir, sec.name), []byte(sec.body), 0o644); err != nil {
						t.Fatal(err)
					}
				}
			}
			var outSecs []section
			for i := 0; i < len(secs); i++ {
				sec := secs[i]
				if sec.kind != "input" {
					if sec.kind == "file" || !*update {
						outSecs = append(outSecs, sec)
					}
					continue
				}
				outSecs = append(outSecs, sec)
				gotOut, gotErr := runCell(t, s, sec.body)
				var wantOut, wantErr, match *string
				for j := i + 1; j < len(secs) && secs[j].kind != "input"; j++ {
					switch secs[j].kind {
					case "output":
						wantOut = &secs[j].body
					case "error":
						wantErr = &secs[j].body
					case "match":
						match = &secs[j].body
					}
				}
				if match != nil {
					matchLines(t, i+1, gotOut, *match)
				}
				if *update {
					if match != nil {
						outSecs = append(outSecs, section{kind: "match", body: *match})
					} else if gotOut != "" {
						outSecs = append(outSecs, section{kind: "output", body: gotOut})
					}
					if gotErr != "" {
						outSecs = append(outSecs, section{kind: "error", body: gotErr})
					}
					continue
				}
				w := ""
				if wantOut != nil {
					w = *wantOut
				}
				if match == nil && gotOut != w {
					t.Errorf("cell at section %d output:\n%s\nwant:\n%s", i+1, gotOut, w)
				}
				w = ""
				if wantErr != nil {
					w = *wantErr
				}
				if gotErr != w {
					t.Errorf("cell at section %d error:\n%s\nwant:\n%s", i+1, gotErr, w)
				}
			}
			if *update {
				if err := os.WriteFile(file, []byte(formatScript(comment, outSecs)), 0o644); err != nil {
					t.Fatal(err)
				}
			}
		})
	}
}

// matchLines checks each output line against the pattern on the same line.
func matchLines(t *testing.T, sec int, got, patterns string) {
	t.Helper()
	gl := strings.Split(strings.TrimSuffix(got, "\n"), "\n")
	pl := strings.Split(strings.TrimSuffix(patterns, "\n"), "\n")
	if len(gl) != len(pl) {
		t.Errorf("cell at section %d: %d output lines, want %d:\n%s", sec, len(gl), len(pl), got)
		return
	}
	for k := range pl {
		re, err := regexp.Compile("^(?:" + pl[k] + ")$")
		if err != nil {
			t.Fatalf("section %d pattern %d: %v", sec, k+1, err)
		}
		if !re.MatchString(gl[k]) {
			t.Errorf("cell at section %d line %d:\n%s\nwant a match of\n%s", sec, k+1, gl[k], pl[k])
		}
	}
}
