package circuit

import (
	"fmt"
	"sort"
	"strings"
)

// MaxErrors is the most problems one load reports. Past it the list ends
// with a line saying how many more were found.
const MaxErrors = 20

// Error is one problem in a circuit file, at a place in it.
type Error struct {
	File      string
	Line, Col int    // 1-based
	Msg       string // what is wrong; what is accepted
	Err       error  // the underlying cause, if any
}

// Error returns "FILE:LINE:COL: what is wrong; what is accepted", the form
// editors and terminals recognise as a jump target.
func (e *Error) Error() string {
	return fmt.Sprintf("%s:%d:%d: %s", e.File, e.Line, e.Col, e.Msg)
}

// Unwrap returns the underlying cause, such as a *ValueError.
func (e *Error) Unwrap() error { return e.Err }

// ErrorList is every problem found in one circuit file, in file order, so a
// user can fix them all in one pass. errors.As on it finds the first *Error.
type ErrorList []*Error

// Error returns one problem per line.
func (l ErrorList) Error() string {
	var b strings.Builder
	for i, e := range l {
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	return b.String()
}

// Unwrap exposes each problem to errors.Is and errors.As.
func (l ErrorList) Unwrap() []error {
	errs := make([]error, len(l))
	for i, e := range l {
		errs[i] = e
	}
	return errs
}

// finish orders the problems by place in the file and cuts the list at
// MaxErrors. It returns nil when there are none, so that a nil ErrorList
// never turns into a non-nil error.
func finish(errs []*Error) error {
	if len(errs) == 0 {
		return nil
	}
	sort.SliceStable(errs, func(i, j int) bool {
		if errs[i].Line != errs[j].Line {
			return errs[i].Line < errs[j].Line
		}
		return errs[i].Col < errs[j].Col
	})
	if len(errs) > MaxErrors {
		rest := errs[MaxErrors]
		more := &Error{File: rest.File, Line: rest.Line, Col: rest.Col,
			Msg: fmt.Sprintf("%d more problems not shown; fix the ones above and load again", len(errs)-MaxErrors)}
		errs = append(errs[:MaxErrors:MaxErrors], more)
	}
	return ErrorList(errs)
}
