// Package qpoint holds the built-in demonstration circuits. The tool itself
// is the command in cmd/qpoint; the analyses live in bias, smallsignal, ac
// and plots.
package qpoint

import "embed"

// Demos holds the demonstration circuit files, testdata/demo/*.yaml, for
// `qpoint demo` to run on a machine without the source tree.
//
//go:embed testdata/demo/*.yaml
var Demos embed.FS
