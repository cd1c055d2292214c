package units

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParse(t *testing.T) {
	// Expected values are written as Go decimal literals, which the compiler
	// rounds correctly; Parse must land on exactly the same float64.
	tests := []struct {
		in   string
		want float64
		unit Unit
	}{
		// plain numbers
		{"4700", 4700, NoUnit},
		{"4.7e3", 4700, NoUnit},
		{"4.7E+3", 4700, NoUnit},
		{"-5", -5, NoUnit},
		{"+5", 5, NoUnit},
		{".5", 0.5, NoUnit},
		{"5.", 5, NoUnit},
		{"  12  ", 12, NoUnit},
		{"0", 0, NoUnit},
		{"1e-300", 1e-300, NoUnit},
		{"1.7976931348623157e308", math.MaxFloat64, NoUnit},
		// SI prefixes (SI Brochure, 9th ed., table 7; table number from memory)
		{"4.7k", 4700, NoUnit},
		{"4.7K", 4700, NoUnit},
		{"100n", 100e-9, NoUnit},
		{"2.2M", 2.2e6, NoUnit},
		{"3300m", 3.3, NoUnit},
		{"10p", 10e-12, NoUnit},
		{"1G", 1e9, NoUnit},
		{"2.2u", 2.2e-6, NoUnit},
		{"2.2\u00b5", 2.2e-6, NoUnit}, // MICRO SIGN
		{"2.2\u03bc", 2.2e-6, NoUnit}, // GREEK SMALL LETTER MU
		{"0.8003", 0.8003, NoUnit},
		{"800.3m", 0.8003, NoUnit},
		{"-4.7k", -4700, NoUnit},
		// units
		{"4.7k\u03a9", 4700, Ohm}, // GREEK CAPITAL LETTER OMEGA
		{"4.7k\u2126", 4700, Ohm}, // OHM SIGN
		{"4.7 k\u03a9", 4700, Ohm},
		{"4.7kohm", 4700, Ohm},
		{"4.7 kOhms", 4700, Ohm},
		{"100 ohm", 100, Ohm},
		{"100\u03a9", 100, Ohm},
		{"3.3V", 3.3, Volt},
		{"3300mV", 3.3, Volt},
		{"50uA", 50e-6, Amp},
		{"50 \u00b5A", 50e-6, Amp},
		{"0.25W", 0.25, Watt},
		{"250 mW", 0.25, Watt},
		{"1Mohm", 1e6, Ohm},
		{"1mohm", 1e-3, Ohm},
		// percentages
		{"1%", 0.01, Percent},
		{"0.5 %", 0.005, Percent},
		{"0.1%", 0.001, Percent},
		{"-2%", -0.02, Percent},
		// IEC 60062:2016 letter-and-digit code; its resistance examples R47, 4R7,
		// 470R, 4K7, 47K, 47K3, 470K, 4M7 as quoted by a secondary source
		{"R47", 0.47, NoUnit},
		{"4R7", 4.7, NoUnit},
		{"470R", 470, NoUnit},
		{"4K7", 4700, NoUnit},
		{"47K", 47e3, NoUnit},
		{"47K3", 47.3e3, NoUnit},
		{"470K", 470e3, NoUnit},
		{"4M7", 4.7e6, NoUnit},
		// the same code with the other spellings the trade uses
		{"4k7", 4700, NoUnit},
		{"2M2", 2.2e6, NoUnit},
		{"1K0", 1000, NoUnit},
		{"0R1", 0.1, NoUnit},
		{"100R", 100, NoUnit},
		{"1G5", 1.5e9, NoUnit},
		{"6L8", 6.8e-3, NoUnit}, // IEC 60062:2016 milliohm letter, from a secondary source
		{"4n7", 4.7e-9, NoUnit}, // IEC 60062 capacitance letters
		{"2u2", 2.2e-6, NoUnit},
		{"2\u00b52", 2.2e-6, NoUnit},
		{"4p7", 4.7e-12, NoUnit},
		{"n47", 0.47e-9, NoUnit},
		{"4k7\u03a9", 4700, Ohm},
		{"4k7 ohm", 4700, Ohm},
		{"-4k7", -4700, NoUnit},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			q, err := Parse(tt.in)
			if err != nil {
				t.Fatalf("Parse(%q): %v", tt.in, err)
			}
			if q.Value != tt.want || q.Unit != tt.unit {
				t.Errorf("Parse(%q) = {%v %v}, want {%v %v}", tt.in, q.Value, q.Unit, tt.want, tt.unit)
			}
		})
	}
}

func TestParseErrors(t *testing.T) {
	tests := []struct {
		in     string
		reason string // a part of the reason
	}{
		{"4.7x", `unknown suffix "x"`},
		{"1..2", "malformed"},
		{"", "empty"},
		{"   ", "empty"},
		{"k", "no number"},
		{"4k7k", "unknown suffix"},
		{"NaN", "no number"},
		{"Inf", "no number"},
		{"-Inf", "no number"},
		{"infinity", "no number"},
		{"1e999", "out of range"},
		{"1" + strings.Repeat("0", 306) + "k", "out of range"}, // 1e309
		{"1e-999", "too small"},
		{"0." + strings.Repeat("0", 320) + "1p", "too small"}, // 1e-333
		{"1e99999999999999999999", "exponent"},
		{"1e", "exponent"},
		{"1e3k", "exponent and a prefix"},
		{"0x10", "unknown suffix"},
		{"1_000", "unknown suffix"},
		{"-", "no number"},
		{"--5", "no number"},
		{".", "no number"},
		{"R", "no number"},
		{"V", "no number"},
		{"kV", "no number"},
		{"%", "no number"},
		{"1k%", "plain number"},
		{"4 k7", "unknown suffix"},
		{"4.7kk", "unknown suffix"},
		{"4.7T", "unknown suffix"}, // tera is not accepted
		{"1 2", "malformed"},
		{"4r7", "unknown suffix"},  // the code letter R is upper case only
		{"3.3v", "unknown suffix"}, // unit symbols are case-sensitive
		{"4.7 kΩ extra", "unknown suffix"},
	}
	for _, tt := range tests {
		t.Run(tt.in, func(t *testing.T) {
			q, err := Parse(tt.in)
			if err == nil {
				t.Fatalf("Parse(%q) = %v, want an error", tt.in, q)
			}
			if !errors.Is(err, ErrSyntax) {
				t.Errorf("Parse(%q) error %v does not wrap ErrSyntax", tt.in, err)
			}
			var pe *ParseError
			if !errors.As(err, &pe) || pe.Text != tt.in {
				t.Errorf("Parse(%q) error %#v is not a *ParseError with the text", tt.in, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "units: cannot read value \"") {
				t.Errorf("Parse(%q) error %q lacks the package prefix and quoted text", tt.in, msg)
			}
			if !strings.Contains(msg, tt.reason) {
				t.Errorf("Parse(%q) error %q does not mention %q", tt.in, msg, tt.reason)
			}
		})
	}
}

func TestParseErrorMessage(t *testing.T) {
	_, err := Parse("4.7x")
	const want = `units: cannot read value "4.7x": unknown suffix "x"`
	if err == nil || err.Error() != want {
		t.Errorf("Parse(\"4.7x\") error = %v, want %s", err, want)
	}
}

func TestParseAs(t *testing.T) {
	tests := []struct {
		in      string
		want    Unit
		value   float64
		errWith []string // non-nil: an error containing each of these
	}{
		{in: "3.3", want: Volt, value: 3.3},
		{in: "3.3V", want: Volt, value: 3.3},
		{in: "3300mV", want: Volt, value: 3.3},
		{in: "4k7", want: Ohm, value: 4700},
		{in: "4.7kΩ", want: Ohm, value: 4700},
		{in: "50uA", want: Amp, value: 50e-6},
		{in: "1%", want: Percent, value: 0.01},
		{in: "0.01", want: Percent, value: 0.01},
		{in: "12", want: NoUnit, value: 12},
		{in: "3.3A", want: Volt, errWith: []string{`"3.3A"`, "A", "V"}},
		{in: "1kΩ", want: Volt, errWith: []string{"Ω", "V"}},
		{in: "1%", want: Volt, errWith: []string{"percentage", "V"}},
		{in: "1%", want: Ohm, errWith: []string{"percentage", "Ω"}},
		{in: "3.3V", want: Percent, errWith: []string{"V", "%"}},
		{in: "3.3V", want: NoUnit, errWith: []string{"V", "plain number"}},
		{in: "3.3x", want: Volt, errWith: []string{"unknown suffix"}},
	}
	for _, tt := range tests {
		t.Run(tt.in+"/"+tt.want.String(), func(t *testing.T) {
			v, err := ParseAs(tt.in, tt.want)
			if tt.errWith == nil {
				if err != nil || v != tt.value {
					t.Errorf("ParseAs(%q, %v) = %v, %v; want %v", tt.in, tt.want, v, err, tt.value)
				}
				return
			}
			if err == nil {
				t.Fatalf("ParseAs(%q, %v) = %v, want an error", tt.in, tt.want, v)
			}
			if !errors.Is(err, ErrSyntax) {
				t.Errorf("ParseAs(%q, %v) error %v does not wrap ErrSyntax", tt.in, tt.want, err)
			}
			for _, s := range tt.errWith {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("ParseAs(%q, %v) error %q does not mention %q", tt.in, tt.want, err, s)
				}
			}
		})
	}
}

func TestUnitString(t *testing.T) {
	want := map[Unit]string{NoUnit: "", Ohm: "Ω", Volt: "V", Amp: "A", Watt: "W", Percent: "%", Unit(99): "Unit(99)"}
	for u, s := range want {
		if got := u.String(); got != s {
			t.Errorf("Unit(%d).String() = %q, want %q", int(u), got, s)
		}
	}
}

// FuzzParse checks that no input panics and that every accepted value is
// finite and survives Format and Parse again within Format's 4 digits.
func FuzzParse(f *testing.F) {
	for _, s := range []string{
		"4700", "4.7e3", "-5", ".5", "4.7k", "4.7 kΩ", "3300mV", "1%", "0.5 %",
		"4k7", "R47", "2M2", "1K0", "100R", "4n7", "2µ2", "6L8", "1e999", "NaN",
		"4.7x", "1..2", "", "k", "4k7k", "1e-320p", "0x1p3",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		q, err := Parse(s)
		if err != nil {
			if !errors.Is(err, ErrSyntax) {
				t.Fatalf("Parse(%q) error %v does not wrap ErrSyntax", s, err)
			}
			return
		}
		if math.IsNaN(q.Value) || math.IsInf(q.Value, 0) {
			t.Fatalf("Parse(%q) accepted a non-finite value %v", s, q.Value)
		}
		// Away from float64's ends (where rounding to 4 digits can overflow
		// or subnormal spacing dominates), the value formats and reads back.
		if a := math.Abs(q.Value); a < 1e-300 || a > 1e300 {
			return
		}
		f := FormatUnit(q.Value, q.Unit)
		back, err := ParseAs(f, q.Unit)
		if err != nil {
			t.Fatalf("Parse(%q) = %v, but Parse(FormatUnit = %q): %v", s, q.Value, f, err)
		}
		if rel := math.Abs(back-q.Value) / math.Abs(q.Value); rel > 5e-4 {
			t.Fatalf("Parse(%q) = %v, Parse(FormatUnit = %q) = %v", s, q.Value, f, back)
		}
	})
}

// TestExampleReads checks that every value Example offers reads back in its
// unit, so that no message asks for a form the parser refuses.
func TestExampleReads(t *testing.T) {
	for _, u := range []Unit{NoUnit, Ohm, Volt, Amp, Watt, Percent} {
		t.Run(Example(u), func(t *testing.T) {
			text := Example(u)
			_, list, ok := strings.Cut(text, " like ")
			if !ok {
				t.Fatalf("%q: no examples", text)
			}
			for _, ex := range strings.FieldsFunc(list, func(r rune) bool { return r == ',' }) {
				ex = strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(ex), "or "))
				for _, e := range strings.Split(ex, " or ") {
					if v, err := ParseAs(e, u); err != nil || !(v > 0) {
						t.Errorf("%q from %q: %v, %v", e, text, v, err)
					}
				}
			}
		})
	}
}
