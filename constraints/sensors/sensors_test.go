package sensors

import (
	"errors"
	"fmt"
	"math"
	"testing"
)

// Pt100 resistances from the IEC 60751 reference table, as commonly
// reprinted to 0.01 Ω (from memory). The equation with the standard's
// coefficients must reproduce them to the table's rounding.
func TestPt100Table(t *testing.T) {
	table := []struct{ celsius, ohms float64 }{
		{-200, 18.52},
		{-100, 60.26},
		{-50, 80.31},
		{0, 100.00},
		{50, 119.40},
		{100, 138.51},
		{200, 175.86},
		{300, 212.05},
		{850, 390.48},
	}
	m := IEC60751(100)
	for _, c := range table {
		r, err := m.Resistance(c.celsius)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r-c.ohms) > 0.005+1e-9 {
			t.Errorf("Pt100 at %g °C: %.4f Ω, table %.2f Ω", c.celsius, r, c.ohms)
		}
	}
	// A Pt1000 is ten times a Pt100 (same coefficients, IEC 60751).
	r, _ := IEC60751(1000).Resistance(100)
	if math.Abs(r-1385.055) > 0.01 {
		t.Errorf("Pt1000 at 100 °C: %.3f Ω", r)
	}
}

// The mean coefficient between 0 and 100 °C of an IEC 60751 sensor is
// α = (R100 − R0) / (100·R0) = 0.00385 /°C, the figure the standard is known
// by.
func TestAlpha(t *testing.T) {
	m := IEC60751(100)
	r100, _ := m.Resistance(100)
	if a := (r100 - 100) / (100 * 100); math.Abs(a-0.00385) > 1e-6 {
		t.Errorf("α = %.7f, want 0.00385", a)
	}
}

func TestRTDRange(t *testing.T) {
	for _, c := range []float64{-201, 851, math.NaN()} {
		if _, err := IEC60751(100).Resistance(c); !errors.Is(err, ErrRange) {
			t.Errorf("%g °C: %v", c, err)
		}
	}
}

// The Beta equation is the Steinhart–Hart equation with C = 0:
// 1/T = 1/T25 + (1/B)·ln(R/R25) gives A = 1/T25 − ln(R25)/B, B' = 1/B
// (Steinhart and Hart, 1968; from memory). Both models must agree exactly.
func TestBetaIsSteinhartHartWithoutCubic(t *testing.T) {
	beta := Beta{R25: 10e3, Beta: 3950}
	sh := SteinhartHart{A: 1/(25+ZeroCelsius) - math.Log(10e3)/3950, B: 1 / 3950.0}
	for c := -40.0; c <= 125; c += 5 {
		rb, err := beta.Resistance(c)
		if err != nil {
			t.Fatal(err)
		}
		rs, err := sh.Resistance(c)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(rb-rs) > 1e-9*rb {
			t.Errorf("%g °C: Beta %g Ω, Steinhart–Hart %g Ω", c, rb, rs)
		}
	}
	// At 25 °C the Beta model gives R25 by definition.
	if r, _ := beta.Resistance(25); math.Abs(r-10e3) > 1e-9 {
		t.Errorf("R(25 °C) = %g", r)
	}
}

// A Steinhart–Hart curve fitted through three points of a Beta thermistor
// passes through them, reads back its own temperatures (Temperature inverts
// Resistance), and stays close to the Beta curve between the points.
func TestFitSteinhartHart(t *testing.T) {
	beta := Beta{R25: 10e3, Beta: 3435}
	var ts, rs [3]float64
	for i, c := range []float64{0, 25, 50} {
		ts[i] = c
		rs[i], _ = beta.Resistance(c)
	}
	sh, err := FitSteinhartHart(ts, rs)
	if err != nil {
		t.Fatal(err)
	}
	for i := range 3 {
		if got := sh.Temperature(rs[i]); math.Abs(got-ts[i]) > 1e-9 {
			t.Errorf("point %d: %g °C, want %g", i, got, ts[i])
		}
	}
	for c := 0.0; c <= 50; c += 2.5 {
		r, err := sh.Resistance(c)
		if err != nil {
			t.Fatal(err)
		}
		if back := sh.Temperature(r); math.Abs(back-c) > 1e-9 {
			t.Errorf("round trip at %g °C gives %g", c, back)
		}
		rb, _ := beta.Resistance(c)
		if math.Abs(r-rb) > 1e-6*rb {
			t.Errorf("%g °C: fitted %g Ω, Beta %g Ω", c, r, rb)
		}
	}
}

// A typical 10k NTC's Steinhart–Hart coefficients (a commonly published set
// for a 10k, B ≈ 3950 part; from memory) give about 10 kΩ at 25 °C, and the
// resistance falls as temperature rises (negative temperature coefficient).
func TestSteinhartHartTypical(t *testing.T) {
	sh := SteinhartHart{A: 1.129148e-3, B: 2.34125e-4, C: 8.76741e-8}
	r25, err := sh.Resistance(25)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r25-10e3) > 0.01*10e3 {
		t.Errorf("R(25 °C) = %g Ω, want about 10 kΩ", r25)
	}
	prev := math.Inf(1)
	for c := -40.0; c <= 125; c += 5 {
		r, err := sh.Resistance(c)
		if err != nil {
			t.Fatal(err)
		}
		if r >= prev {
			t.Errorf("not falling at %g °C", c)
		}
		prev = r
	}
}

func ExampleRTD_Resistance() {
	r, _ := IEC60751(100).Resistance(100)
	fmt.Printf("Pt100 at 100 °C: %.2f Ω\n", r)
	// Output: Pt100 at 100 °C: 138.51 Ω
}

func ExampleBeta_Resistance() {
	r, _ := Beta{R25: 10e3, Beta: 3950}.Resistance(85)
	fmt.Printf("10k B3950 at 85 °C: %.0f Ω\n", r)
	// Output: 10k B3950 at 85 °C: 1087 Ω
}

// An NTC model is not used outside the parts' operating range, nor below
// absolute zero (where the Beta equation would still give a number).
func TestNTCRange(t *testing.T) {
	models := []Model{Beta{R25: 10e3, Beta: 3950}, SteinhartHart{A: 1.129e-3, B: 2.341e-4, C: 8.775e-8}}
	for _, m := range models {
		for _, c := range []float64{-270, -273.15, -300, NTCMin - 1, NTCMax + 1, math.NaN(), math.Inf(1)} {
			if _, err := m.Resistance(c); !errors.Is(err, ErrRange) {
				t.Errorf("%T at %g °C: %v, want ErrRange", m, c, err)
			}
		}
		for _, c := range []float64{NTCMin, 25, NTCMax} {
			if r, err := m.Resistance(c); err != nil || !(r > 0) {
				t.Errorf("%T at %g °C: %g, %v", m, c, r, err)
			}
		}
	}
}

// The IEC 60751 tolerance classes (IEC 60751, values from memory) and the
// slope against the Callendar–Van Dusen equation's derivative,
// dR/dT = R0·(A + 2·B·T) for T ≥ 0 °C and
// R0·(A + 2·B·T + C·(4T³ − 300T²)) below.
func TestClassesAndSlope(t *testing.T) {
	want := map[string][2]float64{"AA": {0.1, 0.0017}, "A": {0.15, 0.002}, "B": {0.3, 0.005}, "C": {0.6, 0.01}}
	for name, w := range want {
		c, ok := LookupClass(name)
		if !ok || c.Offset != w[0] || c.Slope != w[1] {
			t.Errorf("class %s: %+v, want ±(%g + %g|t|)", name, c, w[0], w[1])
		}
		if got := c.Tolerance(-100); math.Abs(got-(w[0]+100*w[1])) > 1e-15 {
			t.Errorf("class %s at -100 °C: ±%g", name, got)
		}
	}
	if _, ok := LookupClass("D"); ok {
		t.Error("class D found")
	}
	m := IEC60751(1000)
	for _, tc := range []float64{-150, -20, 0, 60, 400, RTDMin, RTDMax} {
		d := m.R0 * (m.A + 2*m.B*tc)
		if tc < 0 {
			d += m.R0 * m.C * (4*tc*tc*tc - 300*tc*tc)
		}
		got, err := Slope(m, tc)
		if err != nil || math.Abs(got-d) > 1e-6*math.Abs(d) {
			t.Errorf("slope at %g °C: %g (%v), derivative %g", tc, got, err, d)
		}
	}
}
