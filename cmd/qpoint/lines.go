package main

import (
	"fmt"
	"io"

	"qpoint/plots/report"
	"qpoint/smallsignal"
)

// cautionOutside says on warn, as the loader's cautions are said, where an
// analysis asked for a block or microstrip outside its data or models.
func cautionOutside(warn io.Writer, o []smallsignal.OutsideRange) {
	for _, m := range report.OutsideMessages(o) {
		fmt.Fprintf(warn, "qpoint: caution: %s\n", m)
	}
}
