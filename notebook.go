package main

import (
	"context"
	"crypto/sha256"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"Nutate/display"
	"Nutate/dsl"
	"Nutate/dsl/safefile"
	"Nutate/kernel/nbformat"
)

// notebook is an nbformat 4 notebook (kernel/nbformat reads, writes and compares
// it; this file runs it).
type notebook = nbformat.Notebook

// maxFileBytes bounds a notebook or script read from disk, counted while
// reading.
const maxFileBytes = 512 << 20

// diskState is what a notebook file was when read: an in-place run writes it
// back only when it is still the same (no edit saved meanwhile).
type diskState struct {
	size int64
	mod  time.Time
	sum  [sha256.Size]byte
}

func (a diskState) same(b diskState) bool {
	return a.size == b.size && a.mod.Equal(b.mod) && a.sum == b.sum
}

// readFileState reads a regular file (a named pipe or device is refused, not
// waited on), at most maxFileBytes, with its size, time and hash.
func readFileState(file string) ([]byte, diskState, error) {
	f, err := safefile.Open(file)
	if err != nil {
		return nil, diskState{}, err
	}
	defer f.Close()
	info, err := f.Stat()
	if err != nil {
		return nil, diskState{}, err
	}
	raw, err := io.ReadAll(safefile.LimitReader(f, maxFileBytes))
	if err != nil {
		return nil, diskState{}, err
	}
	return raw, diskState{size: info.Size(), mod: info.ModTime(), sum: sha256.Sum256(raw)}, nil
}

func readNotebook(file string) (notebook, diskState, error) {
	raw, st, err := readFileState(file)
	if err != nil {
		return nil, st, err
	}
	nb, err := nbformat.Parse(raw)
	return nb, st, err
}

func errorOutput(err error) map[string]any {
	name := dsl.ErrorName
	if errors.Is(err, context.Canceled) {
		name = "Interrupted"
	}
	return nbformat.ErrorOutput(name, strings.Split(errorText(err).Error(), "\n"))
}

// execute runs every code cell in one session, replacing outputs and execution
// counts. It stops at the first error, which it records in that cell; the cells
// after it are cleared so that no stale result remains. The error is returned.
func (r *runner) execute(ctx context.Context, file string, nb notebook) error {
	s, err := r.session(file)
	if err != nil {
		return err
	}
	count := 0
	var failed error
	r.cells = nb.CodeCells()
	defer r.clearStatus()
	for i, c := range nb.Cells() {
		cell, ok := c.(map[string]any)
		if !ok || cell["cell_type"] != "code" {
			continue
		}
		if failed != nil {
			cell["outputs"] = []any{}
			cell["execution_count"] = nil
			continue
		}
		count++
		r.cell = count
		r.status(progressLine(count, r.cells, "", 0, 0))
		outputs := []any{}
		err := s.Exec(ctx, nbformat.CellSource(cell), r.sink(func(b display.Bundle) {
			outputs = append(outputs, nbformat.DisplayOutput(b))
		}))
		if err != nil {
			outputs = append(outputs, errorOutput(err))
			failed = fmt.Errorf("cell %d: %v", i+1, errorText(err))
		}
		cell["outputs"] = outputs
		cell["execution_count"] = json.Number(fmt.Sprint(count))
	}
	if failed == nil {
		failed = checkOverrides(s)
	}
	nb.SetKernel(map[string]any{"name": "nutate", "display_name": "Nutate (RF pulses)", "language": "nutate"}, languageInfo().Map())
	meta := nb.Metadata()
	settings := []any{}
	for _, s := range r.sets {
		settings = append(settings, s)
	}
	meta["nutate"] = map[string]any{"version": version, "settings": settings}
	return failed
}

// notebook executes a notebook and writes it back (or to output); with check set it
// compares instead of writing.
func (r *runner) notebook(ctx context.Context, file, output string) error {
	nb, before, err := readNotebook(file)
	if err != nil {
		return err
	}
	if k := nb.Kernel("nutate"); k != "" && k != "nutate" {
		return fmt.Errorf("a notebook for the %q kernel, not Nutate: nothing was run or written", k)
	}
	if r.check {
		stored, _, err := readNotebook(file)
		if err != nil {
			return err
		}
		rc := *r
		if len(rc.sets) == 0 {
			// Re-run as the notebook was run: with the settings it records.
			rc.sets = recordedSettings(nb)
		}
		if err := rc.execute(ctx, file, nb); err != nil {
			return err
		}
		if diff := nbformat.FirstDifference(stored, nb); diff != "" {
			return fmt.Errorf("stored outputs differ from a fresh run:\n%s", diff)
		}
		fmt.Fprintf(r.stdout, "%s: outputs reproduce\n", file)
		return nil
	}
	if output != "" && samePath(output, file) {
		output = "" // --output naming the notebook itself is a run in place
	}
	runErr := r.execute(ctx, file, nb)
	if runErr != nil && output == "" {
		// In place, a failed run would replace the stored outputs of the cells
		// after the failure with nothing: keep the file as it was.
		return fmt.Errorf("%w\nthe notebook was not written (its stored outputs are kept); to see the partial run, write it elsewhere with --output FILE", runErr)
	}
	raw, err := nb.Encode()
	if err != nil {
		return err
	}
	if r.beforeWrite != nil {
		r.beforeWrite()
	}
	if output == "" {
		// In place: only over the bytes that were run. An edit saved during
		// the run (from a notebook server, an editor) is kept, and the run
		// goes beside it. (A save in the instant between this check and
		// the rename is not seen.)
		if _, now, err := readFileState(file); err != nil || !now.same(before) {
			beside := besidePath(file)
			if err := writeAtomic(beside, raw); err != nil {
				return fmt.Errorf("%s changed on disk during the run, so it was not overwritten; writing the run beside it failed: %v", file, err)
			}
			return fmt.Errorf("%s changed on disk during the run (an edit saved meanwhile?), so it was not overwritten: the run is written beside it to %s", file, beside)
		}
		output = file
	}
	if err := writeOutput(output, raw); err != nil {
		return err
	}
	if runErr != nil {
		return fmt.Errorf("%w\nwritten to %s with the error in its cell and the later cells cleared", runErr, output)
	}
	fmt.Fprintf(r.stdout, "%s: executed, written to %s\n", file, output)
	return nil
}

// writeAtomic replaces a file with raw through a synced temporary file in its
// folder: on any failure (a full disk) the file keeps its bytes.
func writeAtomic(path string, raw []byte) error {
	return safefile.WriteFile(path, func(w io.Writer) error {
		_, err := w.Write(raw)
		return err
	})
}

// writeOutput writes an executed notebook: atomically over a regular file,
// or straight into a device or pipe the person named with --output
// (/dev/null, /dev/stdout).
func writeOutput(path string, raw []byte) error {
	if info, err := os.Stat(path); err == nil && !info.Mode().IsRegular() && !info.IsDir() {
		f, err := os.OpenFile(path, os.O_WRONLY, 0)
		if err != nil {
			return err
		}
		_, err = f.Write(raw)
		if cerr := f.Close(); err == nil {
			err = cerr
		}
		return err
	}
	return writeAtomic(path, raw)
}

// besidePath is where an in-place run goes when the notebook changed during
// it: nb.ipynb → nb.nutate-run.ipynb.
func besidePath(file string) string {
	ext := filepath.Ext(file)
	return strings.TrimSuffix(file, ext) + ".nutate-run" + ext
}

// samePath tells whether two paths name one file (the same path cleaned, or
// the same file on disk).
func samePath(a, b string) bool {
	if filepath.Clean(a) == filepath.Clean(b) {
		return true
	}
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	return errA == nil && errB == nil && os.SameFile(sa, sb)
}

// recordedSettings are the --set values a notebook's metadata records.
func recordedSettings(nb notebook) setFlags {
	meta, _ := nb["metadata"].(map[string]any)
	nm, _ := meta["nutate"].(map[string]any)
	list, _ := nm["settings"].([]any)
	var out setFlags
	for _, v := range list {
		if s, ok := v.(string); ok {
			out = append(out, s)
		}
	}
	return out
}
