package main

import (
	"context"
	"os"
	"strings"
	"testing"
	"unicode"

	"Nutate/kernel"
)

// TestProgressDisplayCleared: a long sweep shows a progress display, updates it in
// place, and clears it when done, so saved notebooks keep results only; display
// ids differ between cells (an update reaches every display with its id).
func TestProgressDisplayCleared(t *testing.T) {
	e := newExecutor(t.TempDir())
	run := func(code string) []kernel.Output {
		var outs []kernel.Output
		if err := e.Execute(context.Background(), code, func(o kernel.Output) { outs = append(outs, o) }); err != nil {
			t.Fatalf("%s: %v", code, err)
		}
		return outs
	}
	run("pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)")
	ids := map[string]bool{}
	for cell := 0; cell < 2; cell++ {
		outs := run("sweep p over offset -20 kHz to 20 kHz points 20000 show mz")
		last := map[string]kernel.Output{}
		first := map[string]bool{}
		for _, o := range outs {
			if o.DisplayID == "" {
				continue
			}
			if !first[o.DisplayID] && o.Update {
				t.Errorf("cell %d: display %s updated before it was shown", cell, o.DisplayID)
			}
			first[o.DisplayID] = true
			last[o.DisplayID] = o
		}
		if len(last) == 0 {
			t.Fatalf("cell %d: a sweep of 8e7 steps showed no progress", cell)
		}
		for id, o := range last {
			if ids[id] {
				t.Errorf("display id %s reused in a later cell", id)
			}
			ids[id] = true
			if text, _ := o.Data["text/plain"].(string); !o.Update || text != "" {
				t.Errorf("progress display %s not cleared at the end: %+v", id, o)
			}
		}
	}
}

// The help links point at sections that exist: each anchor is the GitHub-style
// slug of a README heading (lower case, spaces to hyphens, punctuation dropped).
func TestHelpLinksNameReadmeSections(t *testing.T) {
	readme, err := os.ReadFile("README.md")
	if err != nil {
		t.Fatal(err)
	}
	slugs := map[string]bool{}
	for _, line := range strings.Split(string(readme), "\n") {
		if h, ok := strings.CutPrefix(line, "## "); ok {
			var b strings.Builder
			for _, r := range strings.ToLower(h) {
				switch {
				case r == ' ':
					b.WriteRune('-')
				case r == '-' || unicode.IsLetter(r) || unicode.IsDigit(r):
					b.WriteRune(r)
				}
			}
			slugs[b.String()] = true
		}
	}
	if links := languageInfo().HelpLinks; len(links) != 0 {
		t.Errorf("default build: got help links %v, want none (no published address set)", links)
	}
	const base = "https://example.org/nutate/README.md"
	links := helpLinks(base)
	if len(links) == 0 {
		t.Fatal("no help links with a published address")
	}
	for _, l := range links {
		// What classic Notebook makes of the link (requirejs.toUrl appends its
		// cache buster): the fragment up to ":~:" is still the anchor.
		opened := l.URL + "?v=0123abcd"
		rest, directive, ok := strings.Cut(opened, ":~:")
		base2, anchor, ok2 := strings.Cut(rest, "#")
		if !ok || !ok2 || base2 != base || !slugs[anchor] || directive != "?v=0123abcd" {
			t.Errorf("help link %q → %q: want %s#<a README heading>:~:, headings %v", l.Text, l.URL, base, slugs)
		}
	}
}
