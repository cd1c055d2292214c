package ratings

import (
	"math"
	"strings"
	"testing"
)

// TestHazardous checks the ES1 threshold of IEC 62368-1: ES1 is "not
// exceeding 60 V DC" (IEC 62368-1, ES1 limits for DC voltage), so 60 V is
// within ES1 and 60.01 V is not, whatever the sign.
func TestHazardous(t *testing.T) {
	for _, c := range []struct {
		volts float64
		want  bool
	}{
		{59.99, false}, {60, false}, {60.01, true},
		{-59.99, false}, {-60, false}, {-60.01, true},
		{60 * (1 + 1e-13), false}, // rounding residue on the limit is on it
		{0, false}, {1000, true},
	} {
		if got := Hazardous(c.volts); got != c.want {
			t.Errorf("Hazardous(%v) = %v, want %v", c.volts, got, c.want)
		}
	}
}

// TestWatchSpan checks that the watch takes the largest potential
// difference between any two nodes in any condition (KVL: the voltage
// between two nodes is the difference of their potentials to ground),
// keeps the signs of both nodes, and counts ground at 0 V.
func TestWatchSpan(t *testing.T) {
	cases := []struct {
		name    string
		conds   [][]float64 // per condition, potentials of nodes a, b, c
		volts   float64
		hi, lo  string
		where   string
		caution bool
	}{
		{"rails", [][]float64{{40, -40, 0}}, 80, "a", "b", `condition "c0"`, true},
		{"negative", [][]float64{{-61, -1, -2}}, 61, "gnd", "a", `condition "c0"`, true},
		{"below ground only", [][]float64{{-10, -20, -5}}, 20, "gnd", "b", `condition "c0"`, false},
		{"later condition", [][]float64{{30, -29.99, 0}, {30, -30.01, 1}}, 60.01, "a", "b", `condition "c1"`, true},
		{"exactly 60 between nodes", [][]float64{{30, -30, 0}}, 60, "a", "b", `condition "c0"`, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var w Watch
			for ci, v := range c.conds {
				w.Nodes(Where("c"+string(rune('0'+ci)), false), []string{"a", "b", "c"}, v, "gnd")
			}
			s := w.Span()
			if math.Abs(s.Volts-c.volts) > 1e-12 || s.High.Name != c.hi || s.Low.Name != c.lo || s.Where != c.where {
				t.Errorf("span %+v, want %g V from %s to %s in %s", s, c.volts, c.hi, c.lo, c.where)
			}
			if s.High.Volts-s.Low.Volts != s.Volts {
				t.Errorf("span %g V is not the difference of its nodes' potentials %+v", s.Volts, s)
			}
			got := len(w.Cautions()) > 0
			if got != c.caution {
				t.Errorf("caution %v, want %v: %q", got, c.caution, w.Cautions())
			}
		})
	}
}

// TestFit checks the one package rule: a named package is held to its own
// ratings, an unnamed part gets the smallest that fits, and when nothing
// fits the answer is Largest. Expected packages follow from the table by
// hand (derating to half the rated power, common practice, no source).
func TestFit(t *testing.T) {
	cases := []struct {
		named        string
		watts, volts float64
		want         string
		ok           bool
	}{
		{"", 0.001, 3.3, "0201", true},
		{"0603", 0.001, 3.3, "0603", true},
		{"0603", 0.06, 3.3, "0603", false},            // over half of 100 mW
		{"0603", 0.001, 80, "0603", false},            // over 75 V
		{"", 0.4, 300, "2512", false},                 // power fits a 2512, voltage only an axial ½ W: nothing carries both
		{"", 0.2, 300, "axial-1/2W", true},            // both within an axial ½ W
		{"", -0.2, -300, "axial-1/2W", true},          // signs do not matter
		{"axial-1/4W", 0.2, 300, "axial-1/4W", false}, // 0.2 W over its derated 125 mW
	}
	for _, c := range cases {
		p, ok := Fit(c.named, c.watts, c.volts)
		if p.Name != c.want || ok != c.ok {
			t.Errorf("Fit(%q, %g W, %g V) = %s, %v; want %s, %v", c.named, c.watts, c.volts, p.Name, ok, c.want, c.ok)
		}
	}
	if l := Largest(); l.Name != "2512" {
		t.Errorf("Largest = %s, want 2512 (1 W, the most derated power in the table)", l.Name)
	}
}

// TestWatchPackage checks the package caution: a resistor no package
// carries is named with its load, and one that fits gives none.
func TestWatchPackage(t *testing.T) {
	var w Watch
	w.Resistor(Where("low", false), "R1", "", 0.01, 5)
	w.Resistor(Where("low", false), "R2", "", 0.3, 100)
	w.Resistor(Where("high", false), "R2", "", 0.4, 300)
	w.Resistor(Where("high", false), "R3", "0402", 0.04, 5)
	c := w.Cautions()
	if len(c) != 2 {
		t.Fatalf("cautions %q, want two (R2, R3)", c)
	}
	for i, want := range []string{`CAUTION: R2 dissipates up to 0.4 W and has up to 300 V across it, in condition "high"`,
		`CAUTION: R3 dissipates up to 0.04 W and has up to 5 V across it, in condition "high"; its 0402`} {
		if !strings.HasPrefix(c[i], want) {
			t.Errorf("caution %d = %q, want it to start %q", i, c[i], want)
		}
	}
}
