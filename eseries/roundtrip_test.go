package eseries_test

import (
	"testing"

	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
)

// TestRoundTripSeries: for every value of every series over 0.1 Ω .. 10 GΩ,
// Parse(Format(v)) and Parse(Code(v)) of package units give back v exactly,
// since the tables
// have at most three significant figures and both forms write four.
func TestRoundTripSeries(t *testing.T) {
	for _, name := range eseries.Names() {
		s := mustLookup(t, name)
		vals := s.Values(0.1, 10e9)
		if len(vals) != 11*s.PerDecade+1 {
			t.Fatalf("%s: %d values over 0.1..10G", name, len(vals))
		}
		for _, v := range vals {
			f := units.Format(v)
			if q, err := units.Parse(f); err != nil || q.Value != v {
				t.Fatalf("%s: units.Parse(units.Format(%v) = %q) = %v, %v", name, v, f, q.Value, err)
			}
			fu := units.FormatUnit(v, units.Ohm)
			if got, err := units.ParseAs(fu, units.Ohm); err != nil || got != v {
				t.Fatalf("%s: units.ParseAs(units.FormatUnit(%v) = %q) = %v, %v", name, v, fu, got, err)
			}
			c, err := units.Code(v)
			if err != nil {
				t.Fatalf("%s: units.Code(%v): %v", name, v, err)
			}
			if q, err := units.Parse(c); err != nil || q.Value != v {
				t.Fatalf("%s: units.Parse(units.Code(%v) = %q) = %v, %v", name, v, c, q.Value, err)
			}
		}
	}
}

func mustLookup(t *testing.T, name string) *eseries.Series {
	t.Helper()
	s, err := eseries.Lookup(name)
	if err != nil {
		t.Fatal(err)
	}
	return s
}
