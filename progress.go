package main

import (
	"fmt"
	"strings"
)

// A headless run on a terminal shows one status line on standard error,
// rewritten in place: the cell being run and, for long work, its share done.
// It is cleared when the run ends; off a terminal nothing is written.

// progressLine is the status line for code cell `cell` of `cells` (counting from
// 1); task and done/total describe long work inside it (task "" when none).
// A script (cells 0) has no cell part.
func progressLine(cell, cells int, task string, done, total int) string {
	var parts []string
	if cells > 0 {
		parts = append(parts, fmt.Sprintf("cell %d/%d", cell, cells))
	}
	if task != "" {
		parts = append(parts, fmt.Sprintf("%s: %.0f %%", task, 100*float64(min(max(done, 0), total))/float64(max(total, 1))))
	}
	return strings.Join(parts, " · ")
}

// status rewrites the terminal's status line (only when r.progress is set).
func (r *runner) status(line string) {
	if !r.progress {
		return
	}
	fmt.Fprint(r.stderr, "\r"+strings.ReplaceAll(line, "\n", " ")+"\033[K")
}

// clearStatus removes the status line.
func (r *runner) clearStatus() {
	if r.progress {
		fmt.Fprint(r.stderr, "\r\033[K")
	}
}
