package sensors

import (
	"errors"
	"math"
)

// ZeroCelsius is 0 °C in kelvin.
const ZeroCelsius = 273.15

// ErrRange is wrapped by the error for a temperature outside a model's range.
var ErrRange = errors.New("sensors: temperature out of range")

// Model is a resistive temperature sensor.
type Model interface {
	// Resistance returns the sensor's resistance in ohms at a temperature in
	// °C, or an error wrapping ErrRange outside the model's range.
	Resistance(celsius float64) (float64, error)
}

// Beta is an NTC thermistor by the Beta equation:
// R(T) = R25 · exp(B · (1/T − 1/T25)), T in kelvin, T25 = 298.15 K.
type Beta struct {
	R25  float64 // resistance at 25 °C, ohms
	Beta float64 // B constant, kelvin
}

// NTCMin and NTCMax bound the temperatures, in °C, at which an NTC
// thermistor model is used: the operating range of common NTC parts, epoxy
// to glass-encapsulated (common practice, no source). The Beta equation in
// particular is a fit around 25 °C and means little far outside it.
const (
	NTCMin = -80.0
	NTCMax = 300.0
)

// ntcRange refuses a temperature outside NTCMin … NTCMax.
func ntcRange(celsius float64) error {
	if !(celsius >= NTCMin && celsius <= NTCMax) {
		return errorf(ErrRange, "%g °C is outside the NTC thermistor range %g … %g °C", celsius, NTCMin, NTCMax)
	}
	return nil
}

// Resistance returns R(T) within NTCMin … NTCMax.
func (m Beta) Resistance(celsius float64) (float64, error) {
	if err := ntcRange(celsius); err != nil {
		return 0, err
	}
	t := celsius + ZeroCelsius
	return m.R25 * math.Exp(m.Beta*(1/t-1/(25+ZeroCelsius))), nil
}

// SteinhartHart is an NTC thermistor by the Steinhart–Hart equation:
// 1/T = A + B·ln R + C·(ln R)³, T in kelvin, R in ohms.
type SteinhartHart struct {
	A, B, C float64
}

// Temperature returns the temperature in °C at resistance r.
func (m SteinhartHart) Temperature(r float64) float64 {
	x := math.Log(r)
	return 1/(m.A+m.B*x+m.C*x*x*x) - ZeroCelsius
}

// Resistance solves the equation for R, within NTCMin … NTCMax: a cubic in x = ln R,
// C·x³ + B·x + (A − 1/T) = 0, which for a thermistor (B, C ≥ 0) has one real
// root, given by Cardano's formula.
func (m SteinhartHart) Resistance(celsius float64) (float64, error) {
	if err := ntcRange(celsius); err != nil {
		return 0, err
	}
	t := celsius + ZeroCelsius
	if m.B <= 0 {
		return 0, errorf(nil, "Steinhart–Hart B must be positive, got %g", m.B)
	}
	// Start from the root without the cubic term.
	x := (1/t - m.A) / m.B
	if m.C > 0 {
		p := m.B / m.C
		q := (m.A - 1/t) / m.C
		sd := math.Sqrt(q*q/4 + p*p*p/27) // p > 0: one real root
		x = math.Cbrt(-q/2+sd) + math.Cbrt(-q/2-sd)
	}
	// Polish with Newton's method; it also covers C ≤ 0 (a fitted curve can
	// give a tiny negative C), as long as the curve stays monotone.
	for range 50 {
		f := m.A + m.B*x + m.C*x*x*x - 1/t
		df := m.B + 3*m.C*x*x
		if !(df > 0) {
			return 0, errorf(nil, "Steinhart–Hart coefficients %g, %g, %g give no single resistance at %g °C", m.A, m.B, m.C, celsius)
		}
		dx := f / df
		x -= dx
		if math.Abs(dx) <= 1e-15*math.Max(1, math.Abs(x)) {
			break
		}
	}
	r := math.Exp(x)
	if !(r > 0) || math.IsInf(r, 0) {
		return 0, errorf(ErrRange, "%g °C gives no finite resistance", celsius)
	}
	return r, nil
}

// FitSteinhartHart returns the coefficients whose curve passes through three
// (°C, ohms) points, the usual way to characterise a thermistor.
func FitSteinhartHart(t [3]float64, r [3]float64) (SteinhartHart, error) {
	// 1/T_i = A + B·L_i + C·L_i³ is linear in A, B, C; solve the 3×3 system
	// by elimination on differences.
	var l, y [3]float64
	for i := range 3 {
		if !(r[i] > 0) || !(t[i]+ZeroCelsius > 0) {
			return SteinhartHart{}, errorf(nil, "bad point (%g °C, %g Ω)", t[i], r[i])
		}
		l[i] = math.Log(r[i])
		y[i] = 1 / (t[i] + ZeroCelsius)
	}
	g2 := (y[1] - y[0]) / (l[1] - l[0])
	g3 := (y[2] - y[0]) / (l[2] - l[0])
	c := (g3 - g2) / (l[2] - l[1]) / (l[0] + l[1] + l[2])
	b := g2 - c*(l[0]*l[0]+l[0]*l[1]+l[1]*l[1])
	a := y[0] - (b+c*l[0]*l[0])*l[0]
	if math.IsNaN(a) || math.IsNaN(b) || math.IsNaN(c) || math.IsInf(c, 0) {
		return SteinhartHart{}, errorf(nil, "the three points do not determine a curve")
	}
	return SteinhartHart{A: a, B: b, C: c}, nil
}

// RTD is a platinum resistance thermometer by the Callendar–Van Dusen
// equation: R(T) = R0·(1 + A·T + B·T²) for T ≥ 0 °C and
// R(T) = R0·(1 + A·T + B·T² + C·(T − 100)·T³) below 0 °C, T in °C.
type RTD struct {
	R0      float64 // resistance at 0 °C: 100 for a Pt100, 1000 for a Pt1000
	A, B, C float64
}

// IEC 60751 coefficients of industrial platinum sensors (α = 0.00385).
const (
	IEC60751A = 3.9083e-3
	IEC60751B = -5.775e-7
	IEC60751C = -4.183e-12
)

// IEC60751 returns an RTD with the standard's coefficients.
func IEC60751(r0 float64) RTD {
	return RTD{R0: r0, A: IEC60751A, B: IEC60751B, C: IEC60751C}
}

// RTDMin and RTDMax bound the range the IEC 60751 equation covers, in °C.
const (
	RTDMin = -200.0
	RTDMax = 850.0
)

// Resistance returns R(T) within −200 … 850 °C.
func (m RTD) Resistance(celsius float64) (float64, error) {
	if !(celsius >= RTDMin && celsius <= RTDMax) {
		return 0, errorf(ErrRange, "%g °C is outside the RTD range %g … %g °C", celsius, RTDMin, RTDMax)
	}
	t := celsius
	f := 1 + m.A*t + m.B*t*t
	if t < 0 {
		f += m.C * (t - 100) * t * t * t
	}
	return m.R0 * f, nil
}

// Class is a platinum sensor's tolerance class: the largest deviation of
// its temperature from the standard curve's, ±(Offset + Slope·|t|) °C at
// t °C.
type Class struct {
	Name   string  // "AA", "A", "B" or "C"
	Offset float64 // °C
	Slope  float64 // °C per °C of |t|
}

// Classes are the IEC 60751 tolerance classes of platinum sensors, values
// from memory: AA ±(0.1 + 0.0017·|t|), A ±(0.15 + 0.002·|t|),
// B ±(0.3 + 0.005·|t|), C ±(0.6 + 0.01·|t|) °C.
var Classes = []Class{
	{"AA", 0.1, 0.0017},
	{"A", 0.15, 0.002},
	{"B", 0.3, 0.005},
	{"C", 0.6, 0.01},
}

// LookupClass returns the class of that name.
func LookupClass(name string) (Class, bool) {
	for _, c := range Classes {
		if c.Name == name {
			return c, true
		}
	}
	return Class{}, false
}

// Tolerance returns the class's temperature tolerance at t °C, ± that many °C.
func (c Class) Tolerance(celsius float64) float64 {
	return c.Offset + c.Slope*math.Abs(celsius)
}

// Slope returns dR/dT of a model at t °C in ohms per °C, by a central
// difference of 1 m°C (one-sided at the ends of the model's range).
func Slope(m Model, celsius float64) (float64, error) {
	const h = 1e-3
	lo, hi := celsius-h, celsius+h
	rlo, err := m.Resistance(lo)
	if err != nil {
		lo = celsius
		if rlo, err = m.Resistance(lo); err != nil {
			return 0, err
		}
	}
	rhi, err := m.Resistance(hi)
	if err != nil {
		hi = celsius
		if rhi, err = m.Resistance(hi); err != nil {
			return 0, err
		}
	}
	return (rhi - rlo) / (hi - lo), nil
}
