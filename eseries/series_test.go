package eseries

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"strings"
	"testing"
)

func mustLookup(t testing.TB, name string) *Series {
	t.Helper()
	s, err := Lookup(name)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// formulaHundredths is 10^(i/n) rounded to sig significant figures, in
// hundredths: the construction IEC 60063 gives for the series.
func formulaHundredths(n, sig int) []int {
	out := make([]int, n)
	for i := range out {
		v := math.Pow(10, float64(i)/float64(n))
		f, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'f', sig-1, 64), 64)
		out[i] = int(math.Round(f * 100))
	}
	return out
}

// TestTablesAgainstIEC60063 checks every table value. IEC 60063:2015 derives
// the series from 10^(i/n): table 2 (E48, E96, E192) is that rounded to three
// significant figures with a single deviation, 9.20 in E192 (the formula gives
// 9.19); table 1 (E24) is it rounded to two, with the historical values 2.7,
// 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2 kept instead of 2.6, 2.9, 3.2, 3.5,
// 3.8, 4.2, 4.6 and 8.3; and E12, E6, E3 take every 2nd, 4th, 8th E24 value.
// (Construction and deviation list as the standard states them, recalled
// from memory; the formula side is computed here.) So any
// mistyped table entry shows up here as an undocumented deviation.
// This also proves the tables are used, not the formula.
func TestTablesAgainstIEC60063(t *testing.T) {
	// IEC 60063:2015 table 1: position in E24 -> {formula value, table value}.
	e24Deviations := map[int][2]int{
		10: {260, 270}, 11: {290, 300}, 12: {320, 330}, 13: {350, 360},
		14: {380, 390}, 15: {420, 430}, 16: {460, 470}, 22: {830, 820},
	}
	// IEC 60063:2015 table 2: the one E192 deviation.
	e192Deviations := map[int][2]int{185: {919, 920}}

	check := func(name string, sig int, dev map[int][2]int) {
		s := mustLookup(t, name)
		formula := formulaHundredths(s.PerDecade, sig)
		seen := 0
		for i, h := range s.hundredths {
			if d, ok := dev[i]; ok {
				seen++
				if formula[i] != d[0] || h != d[1] {
					t.Errorf("%s[%d]: formula %d table %d, IEC 60063 says formula %d table %d",
						name, i, formula[i], h, d[0], d[1])
				}
				continue
			}
			if h != formula[i] {
				t.Errorf("%s[%d] = %d, IEC 60063 construction gives %d", name, i, h, formula[i])
			}
		}
		if seen != len(dev) {
			t.Errorf("%s: %d of %d documented deviations present", name, seen, len(dev))
		}
	}
	check("E24", 2, e24Deviations)
	check("E48", 3, nil)
	check("E96", 3, nil)
	check("E192", 3, e192Deviations)

	// E3, E6, E12 are every 8th, 4th, 2nd E24 value (IEC 60063:2015 table 1);
	// E48 and E96 every 4th and 2nd E192 value (table 2).
	every := func(name, of string, step int) {
		sub, full := mustLookup(t, name), mustLookup(t, of)
		var want []int
		for i := 0; i < len(full.hundredths); i += step {
			want = append(want, full.hundredths[i])
		}
		if !slices.Equal(sub.hundredths, want) {
			t.Errorf("%s = %v, want every %d of %s: %v", name, sub.hundredths, step, of, want)
		}
	}
	every("E12", "E24", 2)
	every("E6", "E24", 4)
	every("E3", "E24", 8)
	every("E96", "E192", 2)
	every("E48", "E192", 4)
}

// TestE24SpotValues names the E24 values where the formula and the table
// differ, so a reader sees the point without working through the test above.
func TestE24SpotValues(t *testing.T) {
	e24 := mustLookup(t, "E24")
	for _, v := range []float64{2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2} { // IEC 60063:2015 table 1
		if !e24.Contains(v) {
			t.Errorf("E24 lacks %v", v)
		}
	}
	for _, v := range []float64{2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6, 8.3} { // 10^(i/24) rounded
		if e24.Contains(v) {
			t.Errorf("E24 holds the formula value %v", v)
		}
	}
	e192 := mustLookup(t, "E192")
	if !e192.Contains(9.20) || e192.Contains(9.19) { // IEC 60063:2015 table 2
		t.Error("E192 should hold 9.20, not the formula's 9.19")
	}
}

func TestCountsPerDecade(t *testing.T) {
	for _, name := range Names() {
		s := mustLookup(t, name)
		n, _ := strconv.Atoi(strings.TrimPrefix(name, "E"))
		m := s.Mantissas()
		if s.PerDecade != n || len(m) != n {
			t.Errorf("%s: PerDecade %d, %d mantissas, want %d", name, s.PerDecade, len(m), n)
		}
		if m[0] != 1 || !slices.IsSorted(m) || m[len(m)-1] >= 10 {
			t.Errorf("%s: mantissas not ascending in [1,10): %v", name, m)
		}
		if got := len(s.Values(1, 9.99)); got != n {
			t.Errorf("%s: %d values in [1, 9.99], want %d", name, got, n)
		}
	}
}

func TestSubsets(t *testing.T) {
	subset := func(a, b string) bool {
		sa, sb := mustLookup(t, a), mustLookup(t, b)
		for _, m := range sa.Mantissas() {
			if !sb.Contains(m) {
				return false
			}
		}
		return true
	}
	// IEC 60063:2015: each series in a table is contained in the finer ones.
	for _, c := range [][2]string{
		{"E3", "E6"}, {"E6", "E12"}, {"E12", "E24"}, {"E3", "E24"},
		{"E48", "E96"}, {"E96", "E192"}, {"E48", "E192"},
	} {
		if !subset(c[0], c[1]) {
			t.Errorf("%s is not a subset of %s", c[0], c[1])
		}
	}
	// The two tables are separate: E24's two-figure values are mostly not in
	// the three-figure series (IEC 60063:2015 tables 1 and 2).
	for _, c := range [][2]string{{"E24", "E96"}, {"E24", "E192"}, {"E12", "E96"}, {"E96", "E24"}} {
		if subset(c[0], c[1]) {
			t.Errorf("%s should not be a subset of %s", c[0], c[1])
		}
	}
	e96, e192 := mustLookup(t, "E96"), mustLookup(t, "E192")
	for _, v := range []float64{2.7, 3.3, 3.9, 8.2} {
		if e96.Contains(v) || e192.Contains(v) {
			t.Errorf("%v is E24 only but found in E96/E192", v)
		}
	}
	// 4.7 is in E24 and E192 but not E96 (tables 1 and 2).
	if e96.Contains(4.7) || !e192.Contains(4.7) {
		t.Error("4.7 should be in E192 and not in E96")
	}
}

func TestValues(t *testing.T) {
	e12 := mustLookup(t, "E12")
	v := e12.Values(1, 1e6)
	if len(v) != 6*12+1 || v[0] != 1 || v[len(v)-1] != 1e6 {
		t.Fatalf("E12 Values(1, 1M): %d values from %v to %v, want 73 from 1 to 1e6", len(v), v[0], v[len(v)-1])
	}
	if !slices.Contains(v, 4700) || !slices.Contains(v, 820e3) {
		t.Error("E12 Values(1, 1M) lacks exactly 4700 or 820000")
	}

	tests := []struct {
		series string
		lo, hi float64
		want   []float64
	}{
		{"E3", 100, 1000, []float64{100, 220, 470, 1000}},
		{"E3", 0.1, 1, []float64{0.1, 0.22, 0.47, 1}},
		{"E3", 0.3, 0.3, nil},
		{"E6", 4.7e8, 1e9, []float64{4.7e8, 6.8e8, 1e9}},
		{"E12", 8e8, 1.3e9, []float64{8.2e8, 1e9, 1.2e9}},
		{"E24", 4700, 4700, []float64{4700}},
		{"E24", 4700.000001, 5100, []float64{4700, 5100}}, // within 1e-9 relative of 4700
		{"E24", 4701, 5099, nil},
		{"E24", 9000, 11000, []float64{9100, 10000, 11000}},
		{"E96", 0.97, 1.03, []float64{0.976, 1, 1.02}},
		{"E192", 1e-12, 1.02e-12, []float64{1e-12, 1.01e-12, 1.02e-12}},
		{"E3", 5, 1, nil},
		{"E3", 0, 1, nil},
		{"E3", -1, 1, nil},
		{"E3", 1, math.Inf(1), nil},
		{"E3", math.NaN(), 1, nil},
		{"E3", 1, math.NaN(), nil},
	}
	for _, tt := range tests {
		s := mustLookup(t, tt.series)
		got := s.Values(tt.lo, tt.hi)
		// Each expected value is a Go literal, correctly rounded, so equality
		// is exact: 0.47 here is the same float64 as Parse("0.47").
		if !slices.Equal(got, tt.want) {
			t.Errorf("%s.Values(%v, %v) = %v, want %v", tt.series, tt.lo, tt.hi, got, tt.want)
		}
		if n := s.Count(tt.lo, tt.hi); n != len(tt.want) {
			t.Errorf("%s.Count(%v, %v) = %d, want %d", tt.series, tt.lo, tt.hi, n, len(tt.want))
		}
	}
}

// TestValuesWide checks ascending order, exactness and Count over wide and
// random ranges, down to the smallest and up to the largest float64.
func TestValuesWide(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for _, name := range Names() {
		s := mustLookup(t, name)
		for range 200 {
			lo := math.Pow(10, -20+r.Float64()*40)
			hi := lo * math.Pow(10, r.Float64()*8)
			v := s.Values(lo, hi)
			if n := s.Count(lo, hi); n != len(v) {
				t.Fatalf("%s.Count(%v, %v) = %d, len(Values) = %d", name, lo, hi, n, len(v))
			}
			for i, x := range v {
				if x < lo*(1-1e-9) || x > hi*(1+1e-9) || (i > 0 && x <= v[i-1]) {
					t.Fatalf("%s.Values(%v, %v)[%d] = %v out of range or order", name, lo, hi, i, x)
				}
			}
			// Nothing left out at the ends: the neighbours lie outside.
			if b, ok := s.Below(lo); ok && len(v) > 0 && b != v[0] && b >= lo*(1-1e-9) {
				t.Fatalf("%s.Values(%v, %v) misses %v", name, lo, hi, b)
			}
			if a, ok := s.Above(hi); ok && len(v) > 0 && a != v[len(v)-1] && a <= hi*(1+1e-9) {
				t.Fatalf("%s.Values(%v, %v) misses %v", name, lo, hi, a)
			}
		}
		// 600 whole decades, both ends included, no more, no less.
		all := s.Values(1e-300, 1e300)
		if want := 600*s.PerDecade + 1; len(all) != want || s.Count(1e-300, 1e300) != want {
			t.Errorf("%s: %d values in [1e-300, 1e300], want %d", name, len(all), want)
		}
		if n := s.Count(math.SmallestNonzeroFloat64, math.MaxFloat64); n < 600*s.PerDecade {
			t.Errorf("%s: Count over all float64 = %d", name, n)
		}
	}
}

// TestExactDecimals checks that every series value over 0.1..10G is the
// float64 that Go's (correctly rounding) decimal conversion gives for its
// decimal text, so 4.7k is exactly 4700 and 0.47 exactly Parse("0.47").
func TestExactDecimals(t *testing.T) {
	for _, name := range Names() {
		s := mustLookup(t, name)
		for _, v := range s.Values(0.1, 10e9) {
			text := strconv.FormatFloat(v, 'g', 3, 64) // 3 figures hold every table value
			want, err := strconv.ParseFloat(text, 64)
			if err != nil || v != want {
				t.Fatalf("%s value %v is not the float64 of %q (%v)", name, v, text, want)
			}
		}
	}
}

func TestBelowAbove(t *testing.T) {
	tests := []struct {
		series       string
		x            float64
		below, above float64
		okB, okA     bool
	}{
		{"E24", 4700, 4700, 4700, true, true},               // exact hit
		{"E24", 4700 * (1 + 1e-12), 4700, 4700, true, true}, // float noise counts as a hit
		{"E24", 4800, 4700, 5100, true, true},
		{"E24", 9.5, 9.1, 10, true, true},      // between decades
		{"E24", 0.95, 0.91, 1, true, true},     // the same below one
		{"E24", 1, 1, 1, true, true},           // first of a decade
		{"E24", 0.99, 0.91, 1, true, true},     // just below the lowest mantissa
		{"E3", 4.8e9, 4.7e9, 1e10, true, true}, // giga
		{"E3", 1.1e-12, 1e-12, 2.2e-12, true, true},
		{"E96", 9.77, 9.76, 10, true, true},
		{"E192", 9.195, 9.09, 9.2, true, true}, // 9.20, the table's value
		{"E24", 0, 0, 0, false, false},
		{"E24", -5, 0, 0, false, false},
		{"E24", math.NaN(), 0, 0, false, false},
		{"E24", math.Inf(1), 0, 0, false, false},
		{"E24", math.MaxFloat64, 1.6e308, 0, true, false}, // no E24 value above it
		{"E3", 1e-300, 1e-300, 1e-300, true, true},
		{"E12", 1e300, 1e300, 1e300, true, true},
	}
	for _, tt := range tests {
		s := mustLookup(t, tt.series)
		b, okB := s.Below(tt.x)
		a, okA := s.Above(tt.x)
		if b != tt.below || okB != tt.okB || a != tt.above || okA != tt.okA {
			t.Errorf("%s Below/Above(%v) = %v %v / %v %v; want %v %v / %v %v",
				tt.series, tt.x, b, okB, a, okA, tt.below, tt.okB, tt.above, tt.okA)
		}
	}
}

func TestContains(t *testing.T) {
	for _, name := range Names() {
		s := mustLookup(t, name)
		v := s.Values(0.1, 1e9)
		for i, x := range v {
			if !s.Contains(x) || !s.Contains(x*(1+1e-12)) {
				t.Fatalf("%s does not contain its own value %v", name, x)
			}
			if i > 0 {
				mid := (x + v[i-1]) / 2
				if s.Contains(mid) {
					t.Fatalf("%s contains %v, between %v and %v", name, mid, v[i-1], x)
				}
			}
		}
	}
	e24 := mustLookup(t, "E24")
	for _, x := range []float64{0, -4700, math.NaN(), math.Inf(1), math.Inf(-1)} {
		if e24.Contains(x) {
			t.Errorf("E24 contains %v", x)
		}
	}
}

func TestNearest(t *testing.T) {
	stock := []float64{10, 100, 470, 1000, 4700}
	tests := []struct {
		x        float64
		b, a     float64
		okB, okA bool
	}{
		{470, 470, 470, true, true},
		{470 * (1 + 1e-12), 470, 470, true, true},
		{500, 470, 1000, true, true},
		{5, 0, 10, false, true},
		{5000, 4700, 0, true, false},
		{math.NaN(), 0, 0, false, false},
	}
	for _, tt := range tests {
		b, a, okB, okA := Nearest(stock, tt.x)
		if b != tt.b || a != tt.a || okB != tt.okB || okA != tt.okA {
			t.Errorf("Nearest(%v) = %v %v %v %v, want %v %v %v %v", tt.x, b, a, okB, okA, tt.b, tt.a, tt.okB, tt.okA)
		}
	}
	if _, _, okB, okA := Nearest(nil, 1); okB || okA {
		t.Error("Nearest on an empty list found a value")
	}
	Nearest([]float64{5, 1, 3}, 2) // unsorted: any answer, but no panic
}

func TestLookup(t *testing.T) {
	for _, name := range []string{"E24", "e24", " E24 "} {
		s, err := Lookup(name)
		if err != nil || s.Name != "E24" || s.PerDecade != 24 {
			t.Errorf("Lookup(%q) = %+v, %v", name, s, err)
		}
	}
	_, err := Lookup("E7")
	if !errors.Is(err, ErrUnknownSeries) || !strings.Contains(err.Error(), `"E7"`) ||
		!strings.HasPrefix(err.Error(), "eseries: ") {
		t.Errorf("Lookup(\"E7\") error = %v", err)
	}
	// Lookup hands out copies: changing one changes no other.
	a := mustLookup(t, "E12")
	a.Tolerance, a.Name = 1, "x"
	if b := mustLookup(t, "E12"); b.Tolerance != 0.1 || b.Name != "E12" {
		t.Errorf("Lookup returned shared state: %+v", b)
	}
	// Mantissas is a copy too.
	m := a.Mantissas()
	m[0] = 99
	if a.Mantissas()[0] != 1 {
		t.Error("Mantissas returned shared state")
	}
	want := []string{"E3", "E6", "E12", "E24", "E48", "E96", "E192"}
	if got := Names(); !slices.Equal(got, want) {
		t.Errorf("Names() = %v, want %v", got, want)
	}
}

// TestTolerances pins the usual tolerances (from memory / common practice;
// IEC 60063 lists E3 for tolerances above 20 %).
func TestTolerances(t *testing.T) {
	want := map[string]float64{"E3": 0.2, "E6": 0.2, "E12": 0.1, "E24": 0.05, "E48": 0.02, "E96": 0.01, "E192": 0.005}
	for name, tol := range want {
		if s := mustLookup(t, name); s.Tolerance != tol {
			t.Errorf("%s tolerance %v, want %v", name, s.Tolerance, tol)
		}
	}
}

func TestZeroSeries(t *testing.T) {
	var s Series
	if v := s.Values(1, 10); v != nil || s.Count(1, 10) != 0 || s.Contains(1) || len(s.Mantissas()) != 0 {
		t.Error("the zero Series has values")
	}
	if _, ok := s.Below(1); ok {
		t.Error("the zero Series has a value below 1")
	}
	if _, ok := s.Above(1); ok {
		t.Error("the zero Series has a value above 1")
	}
}

func TestCountDoesNotAllocate(t *testing.T) {
	s := mustLookup(t, "E192")
	if n := testing.AllocsPerRun(100, func() { s.Count(0.1, 10e9) }); n != 0 {
		t.Errorf("Count allocates %v times per call", n)
	}
}
