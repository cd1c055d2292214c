package eseries

import (
	"errors"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Series is one preferred-number series. Get one from Lookup; the zero
// Series has no values.
type Series struct {
	Name      string // "E24"
	PerDecade int    // values per decade: 24
	// Tolerance is the series' usual tolerance as a fraction (E24: 0.05).
	// From memory / common practice, not from IEC 60063, which gives the
	// series without binding them to tolerances; E3 is listed there for
	// tolerances above 20 %, taken here as 0.2.
	Tolerance float64

	// hundredths are the mantissas in [1, 10) as integer hundredths
	// (4.7 -> 470), so every value is an exact decimal.
	hundredths []int
}

// The series as IEC 60063:2015 tabulates them: table 1 (E3, E6, E12, E24;
// two significant figures) and table 2 (E48, E96, E192; three). They are
// literal tables, not 10^(i/n) rounded: E24 differs from that formula at
// 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2, and E192 at 9.20.
var (
	e3  = []int{100, 220, 470}
	e6  = []int{100, 150, 220, 330, 470, 680}
	e12 = []int{100, 120, 150, 180, 220, 270, 330, 390, 470, 560, 680, 820}
	e24 = []int{
		100, 110, 120, 130, 150, 160, 180, 200, 220, 240, 270, 300,
		330, 360, 390, 430, 470, 510, 560, 620, 680, 750, 820, 910,
	}
	e48 = []int{
		100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169,
		178, 187, 196, 205, 215, 226, 237, 249, 261, 274, 287, 301,
		316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536,
		562, 590, 619, 649, 681, 715, 750, 787, 825, 866, 909, 953,
	}
	e96 = []int{
		100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130,
		133, 137, 140, 143, 147, 150, 154, 158, 162, 165, 169, 174,
		178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232,
		237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309,
		316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412,
		422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549,
		562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732,
		750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976,
	}
	e192 = []int{
		100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114,
		115, 117, 118, 120, 121, 123, 124, 126, 127, 129, 130, 132,
		133, 135, 137, 138, 140, 142, 143, 145, 147, 149, 150, 152,
		154, 156, 158, 160, 162, 164, 165, 167, 169, 172, 174, 176,
		178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203,
		205, 208, 210, 213, 215, 218, 221, 223, 226, 229, 232, 234,
		237, 240, 243, 246, 249, 252, 255, 258, 261, 264, 267, 271,
		274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312,
		316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361,
		365, 370, 374, 379, 383, 388, 392, 397, 402, 407, 412, 417,
		422, 427, 432, 437, 442, 448, 453, 459, 464, 470, 475, 481,
		487, 493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556,
		562, 569, 576, 583, 590, 597, 604, 612, 619, 626, 634, 642,
		649, 657, 665, 673, 681, 690, 698, 706, 715, 723, 732, 741,
		750, 759, 768, 777, 787, 796, 806, 816, 825, 835, 845, 856,
		866, 876, 887, 898, 909, 920, 931, 942, 953, 965, 976, 988,
	}
)

// all holds the series in Names order. Tolerances: from memory / common
// practice (see Series.Tolerance).
var all = []Series{
	{Name: "E3", PerDecade: 3, Tolerance: 0.2, hundredths: e3},
	{Name: "E6", PerDecade: 6, Tolerance: 0.2, hundredths: e6},
	{Name: "E12", PerDecade: 12, Tolerance: 0.1, hundredths: e12},
	{Name: "E24", PerDecade: 24, Tolerance: 0.05, hundredths: e24},
	{Name: "E48", PerDecade: 48, Tolerance: 0.02, hundredths: e48},
	{Name: "E96", PerDecade: 96, Tolerance: 0.01, hundredths: e96},
	{Name: "E192", PerDecade: 192, Tolerance: 0.005, hundredths: e192},
}

// ErrUnknownSeries is wrapped by Lookup's error for a name it does not know.
var ErrUnknownSeries = errors.New("eseries: unknown series")

// Names returns the series names, coarsest first:
// E3, E6, E12, E24, E48, E96, E192.
func Names() []string {
	names := make([]string, len(all))
	for i, s := range all {
		names[i] = s.Name
	}
	return names
}

// Lookup returns the series called name, ignoring case and surrounding
// space ("e24" is E24). Each call returns a fresh copy, so changing its
// fields affects no one else. An unknown name gives an error that quotes it
// and wraps ErrUnknownSeries.
func Lookup(name string) (*Series, error) {
	n := strings.TrimSpace(name)
	for _, s := range all {
		if strings.EqualFold(s.Name, n) {
			c := s
			return &c, nil
		}
	}
	return nil, errorf(ErrUnknownSeries, "unknown series %q (known: %s)", name, strings.Join(Names(), ", "))
}

// Mantissas returns a new slice of the series' values in [1, 10), ascending.
func (s *Series) Mantissas() []float64 {
	m := make([]float64, len(s.hundredths))
	for i, h := range s.hundredths {
		m[i] = decimal(h, -2)
	}
	return m
}

// relTol is how close, relatively, x must be to a series value to count as
// that value in Contains, Below, Above and the bounds of Values and Count:
// far above float64 rounding (1e-16), far below the closest spacing of two
// E192 values (about 1 %).
const relTol = 1e-9

// Values returns every series value in [lo, hi], ascending, over as many
// decades as the bounds span: E12 from 1 to 1M gives 6*12+1 values. Each is
// the float64 nearest its decimal value, the same one units.Parse gives, so 4.7k
// is exactly 4700. A value within relTol (1e-9 relative) of a bound counts
// as inside. Bounds that are not positive and finite, or hi < lo, give nil.
func (s *Series) Values(lo, hi float64) []float64 {
	var out []float64
	if n := s.Count(lo, hi); n > 0 {
		out = make([]float64, 0, n)
	}
	s.each(lo, hi, func(v float64) { out = append(out, v) })
	return out
}

// Count returns len(s.Values(lo, hi)) without building the list.
func (s *Series) Count(lo, hi float64) int {
	if !validRange(lo, hi) || len(s.hundredths) == 0 {
		return 0
	}
	// Whole decades in between count PerDecade each; only the ends are
	// walked, so Count costs O(PerDecade) however wide the range.
	i, e, j, f := s.span(lo, hi)
	n := len(s.hundredths)
	count := (f-e)*n + j - i + 1
	return max(count, 0)
}

// span returns the positions (index, decade) of the first and last series
// values in [lo, hi], widened by relTol; the first may lie past the last
// when the range holds none.
func (s *Series) span(lo, hi float64) (i, e, j, f int) {
	i, e = s.firstAtOrAbove(lo * (1 - relTol))
	j, f = s.lastAtOrBelow(min(hi*(1+relTol), math.MaxFloat64))
	return i, e, j, f
}

// each calls fn for every value in [lo, hi], ascending.
func (s *Series) each(lo, hi float64, fn func(float64)) {
	if !validRange(lo, hi) || len(s.hundredths) == 0 {
		return
	}
	i, e, j, f := s.span(lo, hi)
	for e < f || (e == f && i <= j) {
		fn(decimal(s.hundredths[i], e))
		i++
		if i == len(s.hundredths) {
			i, e = 0, e+1
		}
	}
}

// Below returns the largest series value <= x; ok is false when there is
// none (x not positive, NaN, or +Inf). A value within relTol of x counts as
// equal, so Below(4700.0000001) is 4700.
func (s *Series) Below(x float64) (float64, bool) {
	if !(x > 0) || math.IsInf(x, 1) || len(s.hundredths) == 0 {
		return 0, false
	}
	i, e := s.lastAtOrBelow(min(x*(1+relTol), math.MaxFloat64))
	v := decimal(s.hundredths[i], e)
	if v <= 0 { // below the smallest float64 a series value can be
		return 0, false
	}
	return v, true
}

// Above returns the smallest series value >= x; ok is false when there is
// none: x NaN, +Inf or above the largest float64 series value, and also
// x <= 0, since series values run down through every decade and have no
// smallest. A value within relTol of x counts as equal, so
// Above(4699.9999999) is 4700.
func (s *Series) Above(x float64) (float64, bool) {
	if !(x > 0) || math.IsInf(x, 1) || len(s.hundredths) == 0 {
		return 0, false
	}
	i, e := s.firstAtOrAbove(x * (1 - relTol))
	v := decimal(s.hundredths[i], e)
	if math.IsInf(v, 1) {
		return 0, false
	}
	return v, true
}

// Contains reports whether x is a series value, within relTol (1e-9
// relative), in any decade.
func (s *Series) Contains(x float64) bool {
	b, ok := s.Below(x)
	return ok && math.Abs(b-x) <= relTol*x
}

// Nearest finds, in an ascending list of values (a stock list), the largest
// value <= x and the smallest value >= x, each with whether it exists. As
// for a Series, a value within 1e-9 relative of x counts as equal to it. An
// unsorted list gives meaningless results but never a panic.
func Nearest(values []float64, x float64) (below, above float64, okBelow, okAbove bool) {
	if math.IsNaN(x) {
		return 0, 0, false, false
	}
	tol := relTol * math.Abs(x)
	// First index with values[i] > x+tol: everything before it is <= x.
	i := sort.Search(len(values), func(i int) bool { return values[i] > x+tol })
	if i > 0 {
		below, okBelow = values[i-1], true
	}
	// First index with values[j] >= x-tol.
	j := sort.Search(len(values), func(j int) bool { return values[j] >= x-tol })
	if j < len(values) {
		above, okAbove = values[j], true
	}
	return below, above, okBelow, okAbove
}

// validRange reports whether lo and hi are positive, finite and ordered.
func validRange(lo, hi float64) bool {
	return lo > 0 && hi >= lo && !math.IsInf(hi, 1)
}

// decade returns the exponent e with 100*10^e <= x < 100*10^(e+1) for
// x > 0, i.e. the power of ten that scales hundredths to x's decade.
func decade(x float64) int {
	e := int(math.Floor(math.Log10(x))) - 2
	// Log10 may be off by one next to a power of ten; settle it exactly.
	for decimal(100, e) > x {
		e--
	}
	for decimal(100, e+1) <= x {
		e++
	}
	return e
}

// firstAtOrAbove returns the position (index i in decade e) of the smallest
// series value >= x, for finite x > 0.
func (s *Series) firstAtOrAbove(x float64) (int, int) {
	e := decade(x)
	for i, h := range s.hundredths {
		if decimal(h, e) >= x {
			return i, e
		}
	}
	return 0, e + 1
}

// lastAtOrBelow returns the position of the largest series value <= x, for
// finite x > 0.
func (s *Series) lastAtOrBelow(x float64) (int, int) {
	e := decade(x)
	for i := len(s.hundredths) - 1; i >= 0; i-- {
		if decimal(s.hundredths[i], e) <= x {
			return i, e
		}
	}
	return len(s.hundredths) - 1, e - 1 // unreachable: hundredths[0] is 100
}

// pow10 holds the powers of ten that float64 represents exactly.
var pow10 = [...]float64{
	1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
}

// decimal returns the float64 nearest m*10^e. With both m and 10^|e|
// exact, one multiplication or division rounds correctly; outside that
// range strconv does the correctly rounded conversion.
func decimal(m, e int) float64 {
	switch {
	case e >= 0 && e < len(pow10):
		return float64(m) * pow10[e]
	case e < 0 && -e < len(pow10):
		return float64(m) / pow10[-e]
	}
	v, _ := strconv.ParseFloat(strconv.Itoa(m)+"e"+strconv.Itoa(e), 64) // ±Inf or 0 at the ends of float64 is what we want
	return v
}
