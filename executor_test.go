package main

import (
	"context"
	"os"
	"strings"
	"testing"
	"unicode"

	"Nutate/kernel"
)

// TestProgressDisplayCleared: a long sweep shows a progress display and updates
// it in place; when the work ends, the outputs a front end keeps (display_data
// appended, update_display_data replacing by display id, clear_output emptying)
// are the cell's results alone, in order: nothing empty is left to be saved.
// Display ids differ between cells (an update reaches every display with its id).
func TestProgressDisplayCleared(t *testing.T) {
	e := newExecutor(t.TempDir())
	run := func(code string) ([]kernel.Output, error) {
		var outs []kernel.Output
		err := e.Execute(context.Background(), code, func(o kernel.Output) { outs = append(outs, o) })
		return outs, err
	}
	if _, err := run("pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)"); err != nil {
		t.Fatal(err)
	}
	// kept applies the messages as a front end does and returns what it stores.
	kept := func(outs []kernel.Output) []kernel.Output {
		var store []kernel.Output
		for _, o := range outs {
			switch {
			case o.Clear:
				store = nil
			case o.Update:
				for i := range store {
					if store[i].DisplayID == o.DisplayID {
						store[i].Data = o.Data
					}
				}
			default:
				store = append(store, o)
			}
		}
		return store
	}
	ids := map[string]bool{}
	cells := []struct {
		code    string
		results int // displays of results the cell makes
	}{
		// A sweep answers with its figure, then its table.
		{"sweep p over offset -20 kHz to 20 kHz points 3000 show mz", 2},
		{"print 1 kHz in uT\nsweep p over offset -20 kHz to 20 kHz points 3000 show mz\nprint 2 kHz in uT", 4},
	}
	for _, c := range cells {
		outs, err := run(c.code)
		if err != nil {
			t.Fatalf("%s: %v", c.code, err)
		}
		progress := map[string]bool{}
		for _, o := range outs {
			if o.DisplayID == "" {
				continue
			}
			if !progress[o.DisplayID] && o.Update {
				t.Errorf("%q: display %s updated before it was shown", c.code, o.DisplayID)
			}
			progress[o.DisplayID] = true
		}
		if len(progress) == 0 {
			t.Fatalf("%q: a sweep of 1.2e7 steps showed no progress", c.code)
		}
		for id := range progress {
			if ids[id] {
				t.Errorf("display id %s reused in a later cell", id)
			}
			ids[id] = true
		}
		store := kept(outs)
		if len(store) != c.results {
			t.Fatalf("%q: a front end keeps %d outputs, want the %d results: %+v", c.code, len(store), c.results, store)
		}
		for i, o := range store {
			text, _ := o.Data["text/plain"].(string)
			if o.DisplayID != "" || strings.TrimSpace(text) == "" {
				t.Errorf("%q: kept output %d is not a result: %+v", c.code, i+1, o)
			}
		}
		if c.results == 4 {
			first, _ := store[0].Data["text/plain"].(string)
			last, _ := store[3].Data["text/plain"].(string)
			if _, ok := store[1].Data["image/svg+xml"]; !ok {
				t.Errorf("%q: kept output 2 is not the sweep's figure: %+v", c.code, store[1])
			}
			if !strings.HasSuffix(first, "µT") || !strings.HasSuffix(last, "µT") {
				t.Errorf("%q: kept outputs %q … %q, want the prints first and last", c.code, first, last)
			}
		}
	}
	// Interrupted during the work: the progress line goes too.
	ctx, cancel := context.WithCancel(context.Background())
	var outs []kernel.Output
	err := e.Execute(ctx, "sweep p over offset -20 kHz to 20 kHz points 3000 show mz", func(o kernel.Output) {
		outs = append(outs, o)
		if o.DisplayID != "" {
			cancel()
		}
	})
	if err == nil {
		t.Fatal("interrupted sweep: got no error")
	}
	if store := kept(outs); len(store) != 0 {
		t.Errorf("interrupted sweep: a front end keeps %+v, want nothing (the error follows)", store)
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
