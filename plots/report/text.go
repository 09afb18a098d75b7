package report

import (
	"fmt"
	"io"
	"strings"
	"unicode/utf8"
)

// Add appends a row of cells.
func (t *Table) Add(cells ...string) { t.Rows = append(t.Rows, cells) }

// numeric reports whether column i is right-aligned on the page.
func (t *Table) numeric(i int) bool {
	if t.Align != nil {
		return i < len(t.Align) && t.Align[i]
	}
	return numericColumn(t.Rows, i)
}

// numericColumn reports whether most cells of column i read as numbers.
func numericColumn(rows [][]string, i int) bool {
	num, all := 0, 0
	for _, r := range rows {
		if i >= len(r) || r[i] == "" {
			continue
		}
		all++
		c := strings.TrimLeft(r[i], "+-−<> ")
		if c != "" && (c[0] >= '0' && c[0] <= '9' || c[0] == '.') {
			num++
		}
	}
	return all > 0 && 2*num >= all
}

// WriteText writes the table as plain text for a terminal: the caption
// after a blank line, then the header, a rule and the rows, two spaces in;
// numeric columns right-aligned (values, and a first column of numbers
// such as frequencies) and the others, text and names, left-aligned,
// three spaces apart.
func (t *Table) WriteText(w io.Writer) {
	widths := make([]int, len(t.Header))
	for _, row := range append([][]string{t.Header}, t.Rows...) {
		for i, c := range row {
			if i < len(widths) {
				widths[i] = max(widths[i], utf8.RuneCountInString(c))
			}
		}
	}
	if t.Caption != "" {
		fmt.Fprintf(w, "\n%s\n", t.Caption)
	}
	// Which columns are numbers, decided once: a cell-by-cell decision
	// reads the whole column for every cell, which made a 2000-step study
	// table of 300 columns take half a minute to print.
	numeric := make([]bool, len(widths))
	for i := range numeric {
		numeric[i] = t.numeric(i)
	}
	line := func(row []string) {
		var b strings.Builder
		b.WriteString("  ")
		for i, c := range row {
			if i >= len(widths) {
				break
			}
			pad := strings.Repeat(" ", widths[i]-utf8.RuneCountInString(c))
			switch {
			case i == 0 && numeric[0]:
				b.WriteString(pad + c)
			case i == 0:
				b.WriteString(c + pad)
			case numeric[i]:
				b.WriteString("   " + pad + c)
			default:
				b.WriteString("   " + c + pad)
			}
		}
		fmt.Fprintln(w, strings.TrimRight(b.String(), " "))
	}
	line(t.Header)
	rule := make([]string, len(widths))
	for i, n := range widths {
		rule[i] = strings.Repeat("─", n)
	}
	line(rule)
	for _, r := range t.Rows {
		line(r)
	}
}
