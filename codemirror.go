package main

import (
	"encoding/json"
	"regexp"
	"sort"
	"strings"

	"Nutate/dsl"
)

// codemirrorMode is the CodeMirror mode that kernel.js defines and that
// language_info names. Classic Notebook finds it once the kernelspec's kernel.js
// has loaded; JupyterLab (CodeMirror 6) knows no such mode without an extension
// and shows the cells as plain text (README, "Install into Jupyter").
const codemirrorMode = "nutate"

// kernelJS is the kernelspec's kernel.js: a CodeMirror 5 mode for classic
// Notebook, written from the language's own word tables (dsl.Words), so the
// highlighting cannot drift from the parser. Styles: keyword (statements and
// clause words), builtin (shapes), property (arguments, quantities, settings,
// axes), number, atom (a unit after a number or `in`), string, comment.
func kernelJS() []byte {
	v := dsl.Words()
	units := append([]string{}, v.Units...)
	// Longest first, so that "mT/m" wins over "mT" and "ms" over "m".
	sort.SliceStable(units, func(i, j int) bool { return len([]rune(units[i])) > len([]rune(units[j])) })
	quoted := make([]string, len(units))
	for i, u := range units {
		quoted[i] = regexp.QuoteMeta(u)
	}
	words := map[string]any{
		"keywords": v.Keywords,
		"shapes":   v.Shapes,
		"names":    v.Names,
		"units":    "^(?:" + strings.Join(quoted, "|") + ")(?![A-Za-z0-9_\u00b5])",
		"comment":  v.Comment,
		"quote":    v.StringQuot,
		"mode":     codemirrorMode,
		"mime":     languageInfo().Mimetype,
	}
	js, err := json.MarshalIndent(words, "  ", "  ")
	if err != nil {
		panic("main: kernel.js words: " + err.Error())
	}
	return []byte(strings.Replace(kernelJSTemplate, "WORDS", string(js), 1))
}

// kernelJSTemplate is an AMD module: classic Notebook requires it when the
// kernel is chosen and calls onload. The mode is defined as the module loads,
// and onload gives it to the cells already shown (a notebook opened before the
// file loaded starts them as plain text).
const kernelJSTemplate = `// Syntax highlighting of the Nutate language in classic Jupyter Notebook
// (CodeMirror 5). Written by "nutate install" from the language's own tables.
define(["codemirror/lib/codemirror", "base/js/namespace", "notebook/js/codecell"], function (CodeMirror, Jupyter, codecell) {
  "use strict";
  var W = WORDS;
  function set(list) {
    var s = {};
    for (var i = 0; i < list.length; i++) s[list[i]] = true;
    return s;
  }
  var keywords = set(W.keywords), shapes = set(W.shapes), names = set(W.names);
  var unit = new RegExp(W.units);
  var number = /^(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/;
  var word = /^[A-Za-z_\u00c0-\uffff][A-Za-z0-9_\u00c0-\uffff]*/;
  CodeMirror.defineMode(W.mode, function () {
    return {
      startState: function () { return {unitNext: false}; },
      token: function (stream, state) {
        var unitNext = state.unitNext;
        state.unitNext = false;
        if (stream.eatSpace()) { state.unitNext = unitNext; return null; }
        if (stream.match(W.comment)) { stream.skipToEnd(); return "comment"; }
        if (stream.match(W.quote)) {
          while (!stream.eol()) { if (stream.next() === W.quote) break; }
          return "string";
        }
        if (unitNext && stream.match(unit)) return "atom";
        if (stream.match(number)) { state.unitNext = true; return "number"; }
        var m = stream.match(word);
        if (m) {
          var w = m[0];
          if (w === "in") state.unitNext = true;
          if (keywords[w]) return "keyword";
          if (shapes[w]) return "builtin";
          if (names[w]) return "property";
          return "variable";
        }
        stream.next();
        return null;
      },
      lineComment: W.comment
    };
  });
  CodeMirror.defineMIME(W.mime, W.mode);
  return {
    onload: function () {
      var nb = Jupyter && Jupyter.notebook;
      if (!nb) return;
      nb.get_cells().forEach(function (cell) {
        if (cell.cell_type === "code") cell.code_mirror.setOption("mode", W.mode);
      });
      if (codecell && codecell.CodeCell) codecell.CodeCell.options_default.cm_config.mode = W.mode;
    }
  };
});
`
