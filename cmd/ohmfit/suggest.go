package main

import (
	"strconv"
	"strings"
	"unicode/utf8"
)

// didYouMean returns ` (did you mean "x"?)` for the candidate closest to
// word, or "" when none is close enough to be a plausible typo. Case is
// ignored when measuring; ties go to the earlier candidate so that messages
// are stable.
func didYouMean(word string, candidates []string) string {
	n := utf8.RuneCountInString(word)
	limit := 1 + n/4 // a slip per four letters still reads as the same word
	best, bestD := "", limit+1
	lw := strings.ToLower(word)
	for _, c := range candidates {
		d := distance(lw, strings.ToLower(c))
		if d < bestD && d < n {
			best, bestD = c, d
		}
	}
	if best == "" {
		return ""
	}
	return " (did you mean " + strconv.Quote(best) + "?)"
}

// distance is the Levenshtein distance between a and b, counting an
// adjacent transposition as one edit because swapped letters are the
// commonest typo in a command or series name.
func distance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	rows := make([][]int, len(ra)+1)
	for i := range rows {
		rows[i] = make([]int, len(rb)+1)
		rows[i][0] = i
	}
	for j := range rows[0] {
		rows[0][j] = j
	}
	for i := 1; i <= len(ra); i++ {
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			d := min(rows[i-1][j]+1, rows[i][j-1]+1, rows[i-1][j-1]+cost)
			if i > 1 && j > 1 && ra[i-1] == rb[j-2] && ra[i-2] == rb[j-1] {
				d = min(d, rows[i-2][j-2]+1)
			}
			rows[i][j] = d
		}
	}
	return rows[len(ra)][len(rb)]
}
