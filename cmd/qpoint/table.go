package main

import (
	"io"

	"qpoint/plots/report"
)

// table is the command's name for a report table, kept so that the
// command's builders read as before: title, header and rows, written as
// text to the terminal or handed whole to the report.
type table struct {
	title  string
	header []string
	rows   [][]string
}

func (t *table) add(cells ...string) { t.rows = append(t.rows, cells) }

func (t *table) write(w io.Writer) { t.report().WriteText(w) }

// report converts the table for the HTML report: the first column holds
// names, the others values, right-aligned where numeric.
func (t *table) report() *report.Table {
	return &report.Table{Caption: t.title, Header: t.header, Rows: t.rows}
}
