package units

import (
	"strings"
	"testing"
	"unicode/utf8"
)

func TestClip(t *testing.T) {
	long := strings.Repeat("9", 100000)
	cases := []struct{ in, want string }{
		{"4.7k", "4.7k"},
		{strings.Repeat("x", QuoteMax), strings.Repeat("x", QuoteMax)},
		{strings.Repeat("x", QuoteMax+1), strings.Repeat("x", QuoteMax-1) + "…"},
		{long, strings.Repeat("9", QuoteMax-1) + "…"},
		{strings.Repeat("µ", 50), strings.Repeat("µ", QuoteMax-1) + "…"}, // cut between characters, not bytes
	}
	for _, c := range cases {
		got := Clip(c.in)
		if got != c.want || !utf8.ValidString(got) || utf8.RuneCountInString(got) > QuoteMax {
			t.Errorf("Clip(%.20q…) = %q, want %q", c.in, got, c.want)
		}
	}
	// A parse error quotes a huge value only in part.
	_, err := Parse(long + "x")
	if err == nil || len(err.Error()) > 120 {
		t.Errorf("Parse of a 100,000-digit value: %d-character error %.80q", len(err.Error()), err)
	}
}

func TestList(t *testing.T) {
	var items []string
	for i := range 500 {
		items = append(items, "R"+strings.Repeat("1", i%3+1))
	}
	got := List(items, ", ")
	if !strings.HasSuffix(got, ", … and 492 more") || strings.Count(got, ",") != ListMax {
		t.Errorf("List of 500 = %q", got)
	}
	if got := List([]string{"a", "b"}, " × "); got != "a × b" {
		t.Errorf("List of 2 = %q", got)
	}
}
