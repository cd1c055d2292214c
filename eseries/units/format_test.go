package units

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestFormat(t *testing.T) {
	tests := []struct {
		in   float64
		want string
	}{
		{4700, "4.7k"},
		{30100, "30.1k"},
		{2.2e6, "2.2M"},
		{1e6, "1M"},
		{0.8, "800m"},
		{2e-8, "20n"},
		{0.80033, "800.3m"},
		{9530, "9.53k"},
		{100, "100"},
		{1e9, "1G"},
		{0, "0"},
		{math.Copysign(0, -1), "0"},
		{1.234567, "1.235"},
		{-4700, "-4.7k"},
		{-0.8, "-800m"},
		{999.96, "1k"},     // rounding carries into the next prefix
		{999.94, "999.9"},  // and does not when it need not
		{999_960, "1M"},    // same at the next prefix
		{0.99996, "1"},     // and upwards to no prefix
		{9.9996e-10, "1n"}, // and from pico to nano
		{4.7e-6, "4.7u"},
		{1e-12, "1p"},
		{1e-15, "0.001p"},  // below the smallest prefix
		{1e12, "1000G"},    // above the largest
		{1.5e15, "1.5e15"}, // far above: an exponent, not a row of zeros
		{9999e9, "9999G"},  // the last that keeps the prefix
		{9999.6e9, "1e13"}, // rounding carries into the exponent form
		{1e21, "1e21"},     // a caution's absurd power
		{-2.5e-18, "-2.5e-18"},
		{1e-16, "1e-16"},
		{5e-324, "4.941e-324"},
		{1.797e308, "1.797e308"},
		{12, "12"},
		{0.001, "1m"},
		{math.NaN(), "NaN"},
		{math.Inf(1), "Inf"},
		{math.Inf(-1), "-Inf"},
	}
	for _, tt := range tests {
		if got := Format(tt.in); got != tt.want {
			t.Errorf("Format(%v) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

func TestFormatSig(t *testing.T) {
	tests := []struct {
		in   float64
		sig  int
		want string
	}{
		{4700, 2, "4.7k"},
		{4749, 2, "4.7k"},
		{4751, 2, "4.8k"},
		{1.234567, 6, "1.23457"},
		{1.234567, 1, "1"},
		{1.234567, 0, "1"},               // clamped to 1
		{1.234567, -3, "1"},              // clamped to 1
		{123456, 1, "100k"},              // one digit, padded with zeros
		{0.1, 17, "100.00000000000001m"}, // 0.1 is not exact in binary
		{1.0 / 3, 20, "333.33333333333331m"},
	}
	for _, tt := range tests {
		if got := FormatSig(tt.in, tt.sig); got != tt.want {
			t.Errorf("FormatSig(%v, %d) = %q, want %q", tt.in, tt.sig, got, tt.want)
		}
	}
}

func TestFormatUnit(t *testing.T) {
	tests := []struct {
		in   float64
		u    Unit
		want string
	}{
		{4700, Ohm, "4.7 kΩ"},
		{0.8, Volt, "800 mV"},
		{20e-6, Amp, "20 µA"},
		{100, Ohm, "100 Ω"},
		{0.25, Watt, "250 mW"},
		{0.005, Percent, "0.5%"},
		{0.01, Percent, "1%"},
		{0.07, Percent, "7%"}, // 0.07*100 is 7.000000000000001 in float64
		{4700, NoUnit, "4.7k"},
	}
	for _, tt := range tests {
		if got := FormatUnit(tt.in, tt.u); got != tt.want {
			t.Errorf("FormatUnit(%v, %v) = %q, want %q", tt.in, tt.u, got, tt.want)
		}
	}
}

// TestFormatUnitSig: the same engineering form as FormatUnit at any number
// of significant digits; open bounds read as infinities.
func TestFormatUnitSig(t *testing.T) {
	tests := []struct {
		in   float64
		u    Unit
		sig  int
		want string
	}{
		{0.59599, Volt, 5, "595.99 mV"},
		{0.59599, Volt, 4, "596 mV"},
		{95.625e-6, Amp, 5, "95.625 µA"},
		{16.3531e-3, Volt, 4, "16.35 mV"},
		{1e3, Ohm, 5, "1 kΩ"},
		{999.996, Ohm, 5, "1 kΩ"}, // rounding carries into the next prefix
		{0.00399, Percent, 3, "0.399%"},
		{2.5, NoUnit, 5, "2.5"},
		{math.Inf(1), Volt, 5, "∞"},
		{math.Inf(-1), Volt, 5, "-∞"},
	}
	for _, tt := range tests {
		if got := FormatUnitSig(tt.in, tt.u, tt.sig); got != tt.want {
			t.Errorf("FormatUnitSig(%v, %v, %d) = %q, want %q", tt.in, tt.u, tt.sig, got, tt.want)
		}
	}
}

// TestFormatParseRoundTrip checks that Parse reads Format's and FormatUnit's
// output back to within half a unit in the 4th significant digit, over
// random values across the whole prefix range (seeded, so repeatable).
func TestFormatParseRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	units := []Unit{NoUnit, Ohm, Volt, Amp, Watt, Percent}
	for range 20000 {
		v := math.Pow(10, -14+r.Float64()*26) // 1e-14 .. 1e12
		if r.IntN(4) == 0 {
			v = -v
		}
		u := units[r.IntN(len(units))]
		var s string
		if r.IntN(2) == 0 {
			s, u = Format(v), NoUnit
		} else {
			s = FormatUnit(v, u)
		}
		got, err := ParseAs(s, u)
		if err != nil {
			t.Fatalf("v=%v: Parse(%q): %v", v, s, err)
		}
		if rel := math.Abs(got-v) / math.Abs(v); rel > 5e-4 {
			t.Fatalf("v=%v: Parse(%q) = %v, relative error %g > 5e-4", v, s, got, rel)
		}
	}
}

func TestCode(t *testing.T) {
	tests := []struct {
		in   float64
		want string
	}{
		// IEC 60062:2016 resistance examples (as quoted by a secondary source)
		{0.47, "R47"},
		{4.7, "4R7"},
		{470, "470R"},
		{4700, "4K7"},
		{47e3, "47K"},
		{47.3e3, "47K3"},
		{470e3, "470K"},
		{4.7e6, "4M7"},
		// the project's own choices, built on the same rule
		{2.2e6, "2M2"},
		{1000, "1K0"},
		{10, "10R"},
		{100, "100R"},
		{1, "1R0"},
		{4990, "4K99"},
		{10e3, "10K"},
		{100e3, "100K"},
		{1.02e6, "1M02"},
		{1e6, "1M0"},
		{1.5e9, "1G5"},
		{10e9, "10G"},
		{1e12, "1000G"},
		{0.1, "R10"},
		{0.15, "R15"},
		{0.047, "R047"},
		{0.01, "R01"},
		{0.005, "R005"},
		{999.96, "1K0"},   // rounded to 4 digits, carrying into K
		{4701.2, "4K701"}, // 4 significant digits kept
	}
	for _, tt := range tests {
		got, err := Code(tt.in)
		if err != nil || got != tt.want {
			t.Errorf("Code(%v) = %q, %v; want %q", tt.in, got, err, tt.want)
		}
	}
}

func TestCodeErrors(t *testing.T) {
	for _, v := range []float64{0, -1, -4700, math.NaN(), math.Inf(1), math.Inf(-1)} {
		if s, err := Code(v); err == nil {
			t.Errorf("Code(%v) = %q, want an error", v, s)
		}
	}
}

// FuzzRoundTrip checks Parse(Format(v)) within Format's 4 digits, and that
// Code, where it gives a code, is read back by Parse to the same rounding.
func FuzzRoundTrip(f *testing.F) {
	for _, v := range []float64{4700, 0.47, 2.2e6, 1, 999.96, 1e-15, 1e12, -30100, 0.80033, 5e-324,
		1e21, 1.5e15, 9999.6e9, 1e-16, -2.5e-18, 1.797e308} {
		f.Add(v)
	}
	f.Fuzz(func(t *testing.T, v float64) {
		if math.IsNaN(v) || math.IsInf(v, 0) || v == 0 {
			return
		}
		s := Format(v)
		got, err := ParseAs(s, NoUnit)
		if err != nil {
			// Only values beyond float64's range once rounded may fail.
			if math.Abs(v) < 1.797e308 {
				t.Fatalf("Parse(Format(%v) = %q): %v", v, s, err)
			}
			return
		}
		if rel := math.Abs(got-v) / math.Abs(v); rel > 5e-4 {
			t.Fatalf("Parse(Format(%v) = %q) = %v, relative error %g", v, s, got, rel)
		}
		// Four digits, a point, a sign and an exponent or prefix: never a
		// row of zeros ("-1.235e-308" is the longest form).
		if len(s) > 11 {
			t.Fatalf("Format(%v) = %q: %d characters", v, s, len(s))
		}
		// The form for people reads back the same way, unit and all.
		if w, err := ParseAs(FormatUnit(v, Watt), Watt); err != nil || w != got {
			t.Fatalf("Parse(FormatUnit(%v, W) = %q) = %v, %v; want %v", v, FormatUnit(v, Watt), w, err, got)
		}
		c, err := Code(v)
		if v < 0 {
			if err == nil {
				t.Fatalf("Code(%v) = %q, want an error", v, c)
			}
			return
		}
		if err != nil {
			t.Fatalf("Code(%v): %v", v, err)
		}
		back, err := Parse(c)
		if err != nil {
			if math.Abs(v) < 1.797e308 {
				t.Fatalf("Parse(Code(%v) = %q): %v", v, c, err)
			}
			return
		}
		if back.Value != got {
			t.Fatalf("Parse(Code(%v) = %q) = %v, Parse(Format) = %v", v, c, back.Value, got)
		}
	})
}
