package units

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// QuoteMax is the most characters of a user's text that a message quotes:
// enough to recognise it, short enough that a 100,000-digit value or a
// pasted paragraph keeps the message on one readable line.
const QuoteMax = 40

// Clip shortens text to at most QuoteMax characters, the last of them an
// ellipsis ("…") when something was cut. It cuts at a character boundary.
func Clip(text string) string {
	if utf8.RuneCountInString(text) <= QuoteMax {
		return text
	}
	n := 0
	for i := range text {
		if n == QuoteMax-1 {
			return text[:i] + "…"
		}
		n++
	}
	return text
}

// Quote is strconv.Quote of Clip(text): the form every message uses to
// quote what a user wrote.
func Quote(text string) string { return strconv.Quote(Clip(text)) }

// ListMax is the most items a message lists before "… and N more".
const ListMax = 8

// List joins items with sep, keeping at most ListMax of them and saying
// how many were left out: "R1, R2, … and 492 more". Each item is clipped.
func List(items []string, sep string) string {
	var b strings.Builder
	for i, it := range items {
		if i == ListMax {
			b.WriteString(sep + "… and " + strconv.Itoa(len(items)-ListMax) + " more")
			break
		}
		if i > 0 {
			b.WriteString(sep)
		}
		b.WriteString(Clip(it))
	}
	return b.String()
}
