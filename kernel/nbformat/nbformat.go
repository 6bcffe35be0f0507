// Package nbformat reads, checks, writes and compares Jupyter notebooks (nbformat 4).
// It knows no language and no kernel: notebooks are kept as generic JSON so that
// fields this program does not know survive a run, and they are written as Jupyter
// writes them (keys sorted, one-space indent, non-ASCII as is, a final newline;
// numbers keep their source text), so a re-run of an unchanged notebook gives
// identical bytes. It imports only the standard library.
package nbformat

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
	"unicode/utf8"
)

// Notebook is an nbformat 4 notebook as generic JSON.
type Notebook map[string]any

// Parse reads nbformat 4 (any minor version) JSON: UTF-8 only (the first other
// byte is named by its offset), one object and nothing after it.
func Parse(raw []byte) (Notebook, error) {
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
	var nb Notebook
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

// Encode writes the notebook as Jupyter does.
func (nb Notebook) Encode() ([]byte, error) {
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", " ")
	if err := enc.Encode(map[string]any(nb)); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// Cells is the notebook's cells list (Parse checked that it is one).
func (nb Notebook) Cells() []any {
	cells, _ := nb["cells"].([]any)
	return cells
}

// CodeCells counts the notebook's code cells.
func (nb Notebook) CodeCells() int {
	n := 0
	for _, c := range nb.Cells() {
		if cell, ok := c.(map[string]any); ok && cell["cell_type"] == "code" {
			n++
		}
	}
	return n
}

// Metadata is the notebook's metadata object, added when it has none.
func (nb Notebook) Metadata() map[string]any {
	meta, _ := nb["metadata"].(map[string]any)
	if meta == nil {
		meta = map[string]any{}
		nb["metadata"] = meta
	}
	return meta
}

// SetKernel records the kernel a notebook was run with: its kernelspec and its
// language_info, which should be exactly kernel_info's so that opening the
// notebook in a client leaves it clean.
func (nb Notebook) SetKernel(kernelspec, languageInfo map[string]any) {
	meta := nb.Metadata()
	meta["kernelspec"] = kernelspec
	meta["language_info"] = languageInfo
}

// Kernel is the kernel a notebook's metadata names, or the language it records
// when it names no kernel ("" when it records neither). own is the language
// name that counts as no other kernel's.
func (nb Notebook) Kernel(own string) string {
	meta, _ := nb["metadata"].(map[string]any)
	if ks, ok := meta["kernelspec"].(map[string]any); ok {
		if name, ok := ks["name"].(string); ok {
			return name
		}
	}
	if li, ok := meta["language_info"].(map[string]any); ok {
		if name, ok := li["name"].(string); ok && name != own {
			return name
		}
	}
	return ""
}

// CellSource joins a cell's source, which nbformat allows as a string or a list.
func CellSource(cell map[string]any) string {
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

// Multiline splits text the way nbformat stores it: lines keeping their "\n".
func Multiline(s string) []any {
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

// DisplayOutput converts a MIME bundle to a display_data output: texts (and
// +xml) as lines, everything else normalized JSON.
func DisplayOutput(bundle map[string]any) map[string]any {
	data := map[string]any{}
	for mime, v := range bundle {
		if s, ok := v.(string); ok && (strings.HasPrefix(mime, "text/") || strings.HasSuffix(mime, "+xml")) {
			data[mime] = Multiline(s)
			continue
		}
		data[mime] = NormalizeJSON(v)
	}
	return map[string]any{"output_type": "display_data", "data": data, "metadata": map[string]any{}}
}

// ErrorOutput is an error output whose evalue is the first line of the traceback.
func ErrorOutput(name string, traceback []string) map[string]any {
	tb := make([]any, len(traceback))
	for i, l := range traceback {
		tb[i] = l
	}
	evalue := ""
	if len(traceback) > 0 {
		evalue = traceback[0]
	}
	return map[string]any{"output_type": "error", "ename": name, "evalue": evalue, "traceback": tb}
}

// NormalizeJSON round-trips a value through JSON so that stored and fresh outputs
// compare alike.
func NormalizeJSON(v any) any {
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

// FirstDifference describes the first place where the code-cell outputs of two
// notebooks differ, or returns "".
func FirstDifference(stored, fresh Notebook) string {
	sc, fc := stored.Cells(), fresh.Cells()
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
			if d := outputDifference(NormalizeJSON(ao[k]), NormalizeJSON(bo[k])); d != "" {
				return fmt.Sprintf("cell %d, output %d: %s", i+1, k+1, d)
			}
		}
	}
	return ""
}

// withoutEmptyDisplays drops display outputs whose data is an empty text: a
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
			if len(data) == 1 && strings.TrimSpace(DataText(data["text/plain"])) == "" {
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
		ja, jb := DataText(ad[k]), DataText(bd[k])
		if ja != jb {
			return firstLineDiff(k, ja, jb)
		}
	}
	return ""
}

// DataText is an output's data for one MIME type as text: lines joined, other
// values as indented JSON.
func DataText(v any) string {
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
