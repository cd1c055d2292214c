package ratings

import (
	"fmt"
	"strings"
	"testing"
)

// TestSmallest checks the derating rule: a package carries a part only up
// to half its rated power (common practice, no source) and only up to its
// working voltage. The expected packages follow from the table by hand.
func TestSmallest(t *testing.T) {
	cases := []struct {
		watts, volts float64
		smd          bool
		want         string
		ok           bool
	}{
		{0.001, 3.3, false, "0201", true},
		{0.025, 3.3, false, "0201", true},  // exactly half of 50 mW: allowed (bounds inclusive)
		{0.0251, 3.3, false, "0402", true}, // just over half of 0201's 50 mW
		{0.05, 5, false, "0603", true},     // half of 0603's 100 mW
		{0.06, 5, false, "0805", true},     // over half of 0603, under half of 0805's 125 mW
		{0.2, 12, false, "1210", true},     // over 1206's derated 125 mW
		{0.001, 100, false, "0805", true},  // voltage rules: 0603 stops at 75 V
		{0.001, 220, false, "axial-1/4W", true},
		{0.2, 300, false, "axial-1/2W", true},
		{0.45, 12, true, "2512", true}, // over 2010's derated 375 mW
		{0.6, 12, false, "", false},    // over half of every rating in the table
		{0.6, 300, true, "", false},
		{2, 12, false, "", false},
	}
	for _, c := range cases {
		p, ok := Smallest(c.watts, c.volts, c.smd)
		if ok != c.ok || p.Name != c.want {
			t.Errorf("Smallest(%g W, %g V, smd=%v) = %q, %v; want %q, %v", c.watts, c.volts, c.smd, p.Name, ok, c.want, c.ok)
		}
		if ok && p.Watts*Derating < c.watts {
			t.Errorf("%s carries %g W, above half its %g W rating", p.Name, c.watts, p.Watts)
		}
	}
}

// TestVerdict checks the classes of load against the derating rule.
func TestVerdict(t *testing.T) {
	p, err := Lookup("0603")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		watts, volts float64
		want         string
	}{
		{0.01, 5, "ok"},
		{0.045, 5, "near"},      // 45 % of rating: above 80 % of the derated 50 %
		{0.07, 5, "derating"},   // 70 %: beyond the derated power
		{0.12, 5, "overload"},   // beyond the rating
		{0.001, 70, "near"},     // 93 % of 75 V
		{0.001, 80, "overload"}, // beyond 75 V
	}
	for _, c := range cases {
		if got := p.LoadOf(c.watts, c.volts).Verdict(); string(got) != c.want {
			t.Errorf("0603 at %g W, %g V: %s, want %s", c.watts, c.volts, got, c.want)
		}
	}
}

// TestLookup checks spellings and the error for an unknown package.
func TestLookup(t *testing.T) {
	for in, want := range map[string]string{"0805": "0805", "1/4W": "axial-1/4W", "AXIAL-1/2W": "axial-1/2W", " 2512 ": "2512"} {
		p, err := Lookup(in)
		if err != nil || p.Name != want {
			t.Errorf("Lookup(%q) = %q, %v; want %q", in, p.Name, err, want)
		}
	}
	if _, err := Lookup("0604"); err == nil || !strings.Contains(err.Error(), "0603") {
		t.Errorf("Lookup(0604): %v, want an error listing the packages", err)
	}
	if Rank("0201") >= Rank("2512") || Rank("nope") != -1 {
		t.Errorf("Rank order wrong")
	}
}

// TestCautions checks that the cautions name the ES1 limit (IEC 62368-1,
// 60 V DC) and defer to codes and licensed practice.
func TestCautions(t *testing.T) {
	if ES1VoltsDC != 60 {
		t.Errorf("ES1VoltsDC = %g, want 60 (IEC 62368-1 ES1 DC limit)", ES1VoltsDC)
	}
	h := HazardCaution(Span{Volts: 80, High: NodeAt{"p40", 40}, Low: NodeAt{"n40", -40}, Where: Where("nominal", false)})
	for _, want := range []string{`between node p40 (+40 V) and node n40 (-40 V) there are 80 V, in condition "nominal"`,
		"60 V DC", "IEC 62368-1", "dangerous current", "creepage", "local electrical codes", "licensed"} {
		if !strings.Contains(h, want) {
			t.Errorf("hazard caution lacks %q: %s", want, h)
		}
	}
	r := RatingCaution("R1", "0603", Load{0.9, 0.2})
	for _, want := range []string{"R1", "90%", "ambient", "licensed"} {
		if !strings.Contains(r, want) {
			t.Errorf("rating caution lacks %q: %s", want, r)
		}
	}
}

// The smallest package for 60 mW at 5 V under the half-power rule.
func ExampleSmallest() {
	p, ok := Smallest(0.060, 5, true)
	fmt.Println(p.Name, ok, p.Derated())
	// Output:
	// 0805 true 0.0625
}
