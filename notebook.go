package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"
	"unicode/utf8"

	"Nutate/display"
	"Nutate/dsl"
	"Nutate/dsl/safefile"
)

// nbformat 4 notebooks are kept as generic JSON so that fields this program does not
// know survive a run. They are written as Jupyter writes them: keys sorted, one-space
// indent, non-ASCII as is, a final newline; numbers keep their source text. So a
// re-run of an unchanged notebook gives identical bytes.

type notebook map[string]any

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
	nb, err := parseNotebook(raw)
	return nb, st, err
}

// parseNotebook reads nbformat 4 (any minor version) JSON: UTF-8 only (the
// first other byte is named by its offset), one object and nothing after it.
func parseNotebook(raw []byte) (notebook, error) {
	if !utf8.Valid(raw) {
		off := 0
		for off < len(raw) {
			r, n := utf8.DecodeRune(raw[off:])
			if r == utf8.RuneError && n == 1 {
				break
			}
			off += n
		}
		return nil, fmt.Errorf("byte %d (line %d) is not UTF-8 (0x%02x): a notebook is UTF-8 JSON", off, bytes.Count(raw[:off], []byte("\n"))+1, raw[off])
	}
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber()
	var nb notebook
	if err := dec.Decode(&nb); err != nil {
		return nil, fmt.Errorf("not a notebook (JSON): %v", err)
	}
	if end := dec.InputOffset(); len(bytes.TrimSpace(raw[end:])) > 0 {
		off := int(end) + len(raw[end:]) - len(bytes.TrimLeft(raw[end:], " \t\r\n"))
		return nil, fmt.Errorf("not a notebook (JSON): data after the notebook's object at byte %d (line %d)", off, bytes.Count(raw[:off], []byte("\n"))+1)
	}
	v, _ := nb["nbformat"].(json.Number)
	if f, err := v.Float64(); err != nil || f != 4 {
		return nil, fmt.Errorf("nbformat %v: want 4", nb["nbformat"])
	}
	if m, ok := nb["nbformat_minor"]; ok {
		n, isNum := m.(json.Number)
		if f, err := n.Float64(); !isNum || err != nil || f < 0 || f != math.Trunc(f) {
			return nil, fmt.Errorf("nbformat_minor %v: want a whole number (0 to 5 are known)", m)
		}
	}
	if _, ok := nb["cells"].([]any); !ok {
		return nil, errors.New("notebook has no cells list")
	}
	return nb, nil
}

func (nb notebook) encode() ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", " ")
	if err := enc.Encode(map[string]any(nb)); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// cellSource joins a cell's source, which nbformat allows as a string or a list.
func cellSource(cell map[string]any) string {
	switch s := cell["source"].(type) {
	case string:
		return s
	case []any:
		var b strings.Builder
		for _, line := range s {
			if str, ok := line.(string); ok {
				b.WriteString(str)
			}
		}
		return b.String()
	}
	return ""
}

// multiline splits text the way nbformat stores it: lines keeping their "\n".
func multiline(s string) []any {
	var out []any
	for len(s) > 0 {
		i := strings.IndexByte(s, '\n')
		if i < 0 {
			out = append(out, s)
			break
		}
		out = append(out, s[:i+1])
		s = s[i+1:]
	}
	if out == nil {
		out = []any{}
	}
	return out
}

// displayOutput converts a bundle to an nbformat display_data output.
func displayOutput(b display.Bundle) map[string]any {
	data := map[string]any{}
	for mime, v := range b {
		if s, ok := v.(string); ok && (strings.HasPrefix(mime, "text/") || strings.HasSuffix(mime, "+xml")) {
			data[mime] = multiline(s)
			continue
		}
		data[mime] = normalizeJSON(v)
	}
	return map[string]any{"output_type": "display_data", "data": data, "metadata": map[string]any{}}
}

// normalizeJSON round-trips a value through JSON so that stored and fresh outputs
// compare alike.
func normalizeJSON(v any) any {
	raw, err := json.Marshal(v)
	if err != nil {
		return fmt.Sprint(v)
	}
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.UseNumber()
	var out any
	if err := dec.Decode(&out); err != nil {
		return fmt.Sprint(v)
	}
	return out
}

func errorOutput(err error) map[string]any {
	tb := strings.Split(errorText(err).Error(), "\n")
	tbAny := make([]any, len(tb))
	for i, l := range tb {
		tbAny[i] = l
	}
	name := dsl.ErrorName
	if errors.Is(err, context.Canceled) {
		name = "Interrupted"
	}
	return map[string]any{"output_type": "error", "ename": name, "evalue": tb[0], "traceback": tbAny}
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
	r.cells = codeCells(nb)
	defer r.clearStatus()
	for i, c := range nb["cells"].([]any) {
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
		err := s.Exec(ctx, cellSource(cell), r.sink(func(b display.Bundle) {
			outputs = append(outputs, displayOutput(b))
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
	meta, _ := nb["metadata"].(map[string]any)
	if meta == nil {
		meta = map[string]any{}
		nb["metadata"] = meta
	}
	lang := languageInfo()
	meta["kernelspec"] = map[string]any{"name": "nutate", "display_name": "Nutate (RF pulses)", "language": "nutate"}
	meta["language_info"] = lang.Map() // exactly kernel_info's, so opening it leaves it clean
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
	if k := kernelOf(nb); k != "" && k != "nutate" {
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
		if diff := firstDifference(stored, nb); diff != "" {
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
	raw, err := nb.encode()
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

// kernelOf is the kernel a notebook's metadata names, or the language it
// records when it names no kernel ("" when it records neither).
func kernelOf(nb notebook) string {
	meta, _ := nb["metadata"].(map[string]any)
	if ks, ok := meta["kernelspec"].(map[string]any); ok {
		if name, ok := ks["name"].(string); ok {
			return name
		}
	}
	if li, ok := meta["language_info"].(map[string]any); ok {
		if name, ok := li["name"].(string); ok && name != "nutate" {
			return name
		}
	}
	return ""
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

// firstDifference describes the first place where the code-cell outputs of two
// notebooks differ, or returns "".
func firstDifference(stored, fresh notebook) string {
	sc, fc := stored["cells"].([]any), fresh["cells"].([]any)
	for i := range fc {
		if i >= len(sc) {
			return fmt.Sprintf("cell %d: missing in the stored notebook", i+1)
		}
		a, _ := sc[i].(map[string]any)
		b, _ := fc[i].(map[string]any)
		if b["cell_type"] != "code" {
			continue
		}
		ao, _ := a["outputs"].([]any)
		bo, _ := b["outputs"].([]any)
		ao, bo = withoutEmptyDisplays(ao), withoutEmptyDisplays(bo)
		for k := 0; k < max(len(ao), len(bo)); k++ {
			if k >= len(ao) {
				return fmt.Sprintf("cell %d: output %d is missing from the stored notebook", i+1, k+1)
			}
			if k >= len(bo) {
				return fmt.Sprintf("cell %d: stored output %d is not produced by a fresh run", i+1, k+1)
			}
			if d := outputDifference(normalizeJSON(ao[k]), normalizeJSON(bo[k])); d != "" {
				return fmt.Sprintf("cell %d, output %d: %s", i+1, k+1, d)
			}
		}
	}
	return ""
}

// withoutEmptyDisplays drops display outputs whose data is an empty text: the
// kernel's progress display ended so before it was taken away with clear_output,
// and notebooks run then by a Jupyter client keep it; a headless run has none.
func withoutEmptyDisplays(outs []any) []any {
	var kept []any
	for _, o := range outs {
		m, _ := o.(map[string]any)
		if m["output_type"] == "display_data" {
			data, _ := m["data"].(map[string]any)
			if len(data) == 0 {
				continue
			}
			if len(data) == 1 && strings.TrimSpace(dataText(data["text/plain"])) == "" {
				if _, ok := data["text/plain"]; ok {
					continue
				}
			}
		}
		kept = append(kept, o)
	}
	return kept
}

func outputDifference(a, b any) string {
	am, _ := a.(map[string]any)
	bm, _ := b.(map[string]any)
	ad, _ := am["data"].(map[string]any)
	bd, _ := bm["data"].(map[string]any)
	if ad == nil || bd == nil {
		if ja, jb := jsonText(a), jsonText(b); ja != jb {
			return firstLineDiff("output", ja, jb)
		}
		return ""
	}
	keys := map[string]bool{}
	for k := range ad {
		keys[k] = true
	}
	for k := range bd {
		keys[k] = true
	}
	for _, k := range sortedKeys(keys) {
		ja, jb := dataText(ad[k]), dataText(bd[k])
		if ja != jb {
			return firstLineDiff(k, ja, jb)
		}
	}
	return ""
}

func dataText(v any) string {
	if lines, ok := v.([]any); ok {
		var b strings.Builder
		for _, l := range lines {
			s, ok := l.(string)
			if !ok {
				return jsonText(v)
			}
			b.WriteString(s)
		}
		return b.String()
	}
	if s, ok := v.(string); ok {
		return s
	}
	return jsonText(v)
}

func jsonText(v any) string {
	raw, _ := json.MarshalIndent(v, "", " ")
	return string(raw)
}

func firstLineDiff(what, a, b string) string {
	al, bl := strings.Split(a, "\n"), strings.Split(b, "\n")
	for i := 0; i < max(len(al), len(bl)); i++ {
		var x, y string
		if i < len(al) {
			x = al[i]
		}
		if i < len(bl) {
			y = bl[i]
		}
		if x != y {
			return fmt.Sprintf("%s, line %d:\n  stored: %s\n  fresh:  %s", what, i+1, clip(x), clip(y))
		}
	}
	return what + " differs"
}

func clip(s string) string {
	if len(s) > 200 {
		return s[:200] + "…"
	}
	return s
}

func sortedKeys(m map[string]bool) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
