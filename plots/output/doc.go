// Package output writes what the qpoint command produces, safely: files
// whole or not at all, text with its control characters made visible, and
// progress on a terminal only.
//
// WriteFile writes a file through a temporary file renamed into place, so
// that a failed or interrupted write leaves any old file untouched;
// Partials knows the temporary files still being written, for an
// interrupt to remove. Target says what an output path may be (a regular
// file, a link to one, a device or pipe written through), CheckFolder
// whether its folder can hold it, and Check all of a run's outputs at
// once before any is written (no two on one file); their refusals are
// *PathError.
// Escaping shows control characters and bidirectional overrides as
// escapes; Checked keeps a writer's first error. Progress draws a bar on
// a terminal and nothing elsewhere.
//
// The command's own policy (which files are its inputs, and so may not
// be written; what an interrupt does) stays with the command.
package output
