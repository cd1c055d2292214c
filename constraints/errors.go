package constraints

import (
	"errors"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Error is a problem in a template: where it is and what is wrong. Every
// error Load and Parse return is an *Error (use errors.As); causes from other
// packages (a value eseries could not read, a file that could not be opened)
// are kept in Err so errors.Is still finds them.
type Error struct {
	File string // file the problem is in; "" when unknown
	Line int    // 1-based; 0 when unknown
	Col  int    // 1-based; 0 when unknown
	Key  string // path of the offending key, e.g. "parts[2].value"; "" for the whole file
	Msg  string // one line, without the position
	Err  error  // underlying cause, if any

	// order, when set, is the template position used to pick the first
	// problem: a stock file's error sits in another file but is ordered
	// by the key that named that file.
	order Pos
}

// Error returns "file:line:col: msg", leaving out the parts that are unknown.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		if b.Len() > 0 {
			b.WriteByte(':')
		}
		b.WriteString(strconv.Itoa(e.Line))
		if e.Col > 0 {
			b.WriteByte(':')
			b.WriteString(strconv.Itoa(e.Col))
		}
	}
	if b.Len() > 0 {
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

// Unwrap returns the underlying cause, or nil.
func (e *Error) Unwrap() error { return e.Err }

// Message returns the error's text for a person, position first: the same
// as Error, since an *Error names no package.
func (e *Error) Message() string { return e.Error() }

// Message returns an error's text for a person: the message of the first
// error in its chain that has one written for people (the *Error types of
// ohmfit's packages, which leave out the package's name), else its own
// text. It is the one rule for turning a library error into what a command
// prints; nothing edits an error's text as a string.
func Message(err error) string {
	var m interface{ Message() string }
	if errors.As(err, &m) {
		return m.Message()
	}
	return err.Error()
}

// before orders errors by position so the first one in the file is reported;
// errors without a line (whole-file problems) come first.
func (e *Error) before(o *Error) bool {
	a, b := e.sortPos(), o.sortPos()
	if a.Line != b.Line {
		return a.Line < b.Line
	}
	return a.Col < b.Col
}

func (e *Error) sortPos() Pos {
	if e.order.Line > 0 {
		return e.order
	}
	return Pos{e.Line, e.Col}
}

// Suggest returns ` (did you mean "x"?)` for the candidate closest to word,
// or "" when none is close enough to be a plausible typo: the same
// suggestions template messages make, for the command line to share.
func Suggest(word string, candidates []string) string { return suggest(word, candidates) }

// suggest returns ` (did you mean "x"?)` for the candidate closest to word,
// or "" when none is close enough to be a plausible typo. Case is ignored
// when measuring, so "r1" suggests "R1"; ties go to the earlier candidate so
// messages are stable.
func suggest(word string, candidates []string) string {
	n := utf8.RuneCountInString(word)
	limit := 1
	switch {
	case n > 6:
		limit = 3
	case n > 3:
		limit = 2
	}
	best, bestD := "", limit+1
	lw := strings.ToLower(word)
	for _, c := range candidates {
		if c == word {
			continue
		}
		lc := strings.ToLower(c)
		d := editDistance(lw, lc)
		// A cut-short key ("supply_power") is as likely as a typo.
		if n >= 3 && strings.HasPrefix(lc, lw) {
			d = min(d, 1)
		}
		// A distance equal to the word's length means nothing in common.
		if d < bestD && d < n {
			best, bestD = c, d
		}
	}
	if best == "" {
		return ""
	}
	return " (did you mean " + strconv.Quote(best) + "?)"
}

// editDistance is the optimal-string-alignment distance between a and b:
// insertions, deletions, substitutions and adjacent transpositions each cost
// one, because swapped letters are the commonest typo in a key.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	// Three rows suffice for the transposition look-back.
	prev2 := make([]int, len(rb)+1)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
			if i > 1 && j > 1 && ra[i-1] == rb[j-2] && ra[i-2] == rb[j-1] {
				cur[j] = min(cur[j], prev2[j-2]+1)
			}
		}
		prev2, prev, cur = prev, cur, prev2
	}
	return prev[len(rb)]
}
