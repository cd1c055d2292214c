package main

import (
	"io"
	"strings"
	"unicode/utf8"
)

// column describes one column of a table: how its cells line up and how
// many spaces follow it.
type column struct {
	right bool // right-align (numbers); otherwise left-align (names)
	gap   int  // spaces after the column; 0 for the last
}

// table lines up rows of cells. text/tabwriter cannot mix left- and
// right-aligned columns, and our tables put the digits of a value flush
// right with its unit in a column of its own ("800 mV" over "3.3 V" aligns
// the digits, not the prefixes).
type table struct {
	indent string
	cols   []column
	rows   [][]string
}

// add appends one row; missing cells are blank.
func (t *table) add(cells ...string) { t.rows = append(t.rows, cells) }

// write renders the table, one line per row, without trailing spaces.
func (t *table) write(w io.Writer) error {
	width := make([]int, len(t.cols))
	for _, r := range t.rows {
		for i, c := range r {
			width[i] = max(width[i], utf8.RuneCountInString(c))
		}
	}
	var b strings.Builder
	for _, r := range t.rows {
		var line strings.Builder
		line.WriteString(t.indent)
		for i, col := range t.cols {
			c := ""
			if i < len(r) {
				c = r[i]
			}
			pad := strings.Repeat(" ", width[i]-utf8.RuneCountInString(c))
			if col.right {
				line.WriteString(pad + c)
			} else {
				line.WriteString(c + pad)
			}
			line.WriteString(strings.Repeat(" ", col.gap))
		}
		b.WriteString(strings.TrimRight(line.String(), " "))
		b.WriteByte('\n')
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// splitUnit splits "800 mV" into "800" and "mV" so that the two can sit in
// columns of their own.
func splitUnit(s string) (num, unit string) {
	num, unit, _ = strings.Cut(s, " ")
	return num, unit
}
