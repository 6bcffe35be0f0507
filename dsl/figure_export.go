package dsl

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"Nutate/display"
	"Nutate/dsl/safefile"
)

// figureFormats are the file formats of `export figure`, by extension.
var figureFormats = map[string]string{".svg": "SVG", ".png": "PNG", ".pdf": "PDF"}

// exportFigure runs `export figure to "file.svg"` (or .png, .pdf): the
// session's last figure (of a sweep or describe) drawn again by gonum/plot's
// own back end for that format. An existing file is replaced only if it is a
// figure export itself.
func (ev *evaluator) exportFigure(s *ExportStmt) error {
	ext := strings.ToLower(filepath.Ext(s.Path))
	format, ok := figureFormats[ext]
	if !ok {
		got := ext
		if got == "" {
			got = "no extension"
		}
		return errAt(s.PathP, "export figure writes .svg, .png or .pdf, got %s", got)
	}
	if ev.st.figure == nil {
		return errAt(s.Name.P, "no figure has been drawn yet in this session (sweep and describe draw one)")
	}
	real, shown, err := ev.resolvePath(s.Path, s.PathP)
	if err != nil {
		return err
	}
	if err := checkFigureOverwrite(s, real, shown, format); err != nil {
		return err
	}
	data, err := display.FigureFile(ev.st.figure, strings.ToLower(format))
	if err != nil {
		return errAt(s.PathP, "cannot draw the figure as %s: %v", format, err)
	}
	if err := safefile.WriteFile(real, func(w io.Writer) error { _, err := w.Write(data); return err }); err != nil {
		return errAt(s.PathP, "%v", strings.Replace(err.Error(), real, shown, 1))
	}
	detail := format
	if format == "PNG" {
		detail = fmt.Sprintf("PNG, %d dpi", display.FileDPI)
	}
	ev.emit(textBundle(fmt.Sprintf("exported the figure %s to %s (%s)", quoteText(display.FigureTitle(ev.st.figure)), shown, detail)))
	return nil
}

// maxFigureCheck bounds how much of an existing file is read to tell whether
// it is a figure export (a PDF says so at its end).
const maxFigureCheck = 64 << 20

// checkFigureOverwrite refuses to replace a file that is not a figure export of
// the same format.
func checkFigureOverwrite(s *ExportStmt, real, shown, format string) error {
	info, err := os.Lstat(real)
	if err != nil {
		return nil
	}
	if info.IsDir() {
		return errAt(s.PathP, "%s is a folder; want a file name", shown)
	}
	f, err := safefile.Open(real)
	if err != nil {
		return errAt(s.PathP, "cannot check %s before overwriting it: %v", shown, strings.Replace(err.Error(), real, shown, 1))
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxFigureCheck))
	if err != nil {
		return errAt(s.PathP, "cannot check %s before overwriting it: %v", shown, err)
	}
	if !display.IsFigureFile(strings.ToLower(format), data) {
		return errAt(s.PathP, "%s exists and is not a figure export; refusing to overwrite it (choose another name or remove the file)", shown)
	}
	return nil
}
