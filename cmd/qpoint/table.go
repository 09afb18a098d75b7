package main

import (
	"fmt"
	"io"
	"qpoint/plots/report"
	"strings"
	"unicode/utf8"
)

// table is a plain-text table: a title, a header row and aligned columns.
// The first column is left-aligned (names), the rest right-aligned (values).
type table struct {
	title  string
	header []string
	rows   [][]string
}

func (t *table) add(cells ...string) { t.rows = append(t.rows, cells) }

func (t *table) write(w io.Writer) {
	widths := make([]int, len(t.header))
	for _, row := range append([][]string{t.header}, t.rows...) {
		for i, c := range row {
			if i < len(widths) {
				widths[i] = max(widths[i], utf8.RuneCountInString(c))
			}
		}
	}
	if t.title != "" {
		fmt.Fprintf(w, "\n%s\n", t.title)
	}
	line := func(row []string) {
		var b strings.Builder
		b.WriteString("  ")
		for i, c := range row {
			if i >= len(widths) {
				break
			}
			pad := strings.Repeat(" ", widths[i]-utf8.RuneCountInString(c))
			if i == 0 {
				b.WriteString(c + pad)
			} else {
				b.WriteString("   " + pad + c)
			}
		}
		fmt.Fprintln(w, strings.TrimRight(b.String(), " "))
	}
	line(t.header)
	rule := make([]string, len(widths))
	for i, n := range widths {
		rule[i] = strings.Repeat("─", n)
	}
	line(rule)
	for _, r := range t.rows {
		line(r)
	}
}

// report converts the table for the HTML report: the first column holds
// names, the others values.
func (t *table) report() *report.Table {
	rt := &report.Table{Caption: t.title, Header: t.header, Rows: t.rows}
	for i := range t.header {
		rt.Align = append(rt.Align, i > 0 && numericColumn(t.rows, i))
	}
	return rt
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
