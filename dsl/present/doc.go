// Package present turns a study's results into tables and figure bundles: a
// sweep's curves and maps (sweep.go), figure bundles with their data
// decimated past a size (figure.go), number formatting (num.go) and the
// wording of notes and cautions (notes.go). It takes plain result values,
// filled by the language's study code after running and measuring, and
// imports only the standard library and package display: never the language
// (package dsl) nor physics. arch_test.go holds it to that.
package present
