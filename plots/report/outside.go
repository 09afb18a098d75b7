package report

import (
	"fmt"
	"io"

	"qpoint/smallsignal"
)

// OutsideMessages returns the sentences of range cautions.
func OutsideMessages(o []smallsignal.OutsideRange) []string {
	var m []string
	for _, x := range o {
		m = append(m, x.Message())
	}
	return m
}

// WriteOutside prints the range cautions of an analysis under a heading
// of their own: they concern the data and models, not the parts' safety.
func WriteOutside(w io.Writer, o []smallsignal.OutsideRange) {
	if len(o) == 0 {
		return
	}
	fmt.Fprintf(w, "\nCautions (frequencies outside the data or models of lines and blocks)\n")
	for _, m := range OutsideMessages(o) {
		fmt.Fprintf(w, "  ! %s\n", m)
	}
}
