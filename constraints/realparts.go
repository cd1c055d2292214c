package constraints

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"gopkg.in/yaml.v3"
)

// This file reads the keys that describe real parts rather than ideal ones:
// `tolerance`, `tcr` and `package` on parts and in `choose`,
// `limits.max_package` and the `ambient` temperature range.

// ParseTCR reads a temperature coefficient: "100ppm", "±100 ppm/K",
// "50ppm/°C", "0.01%/°C", or 0. It returns the coefficient's size per °C
// (100ppm gives 1e-4). A bare number other than 0 is refused: the unit is
// what tells ppm from percent.
//
// A TCR is used as the band a datasheet states (±100 ppm/K): the value may
// drift either way by that much. A negative coefficient ("-100ppm": some
// thick-film and carbon parts fall with temperature) is therefore read as
// the band of its size, which contains it; the worst case is then
// conservative rather than wrong.
func ParseTCR(text string) (float64, error) {
	s := strings.TrimSpace(text)
	if s == "0" || s == "±0" || s == "+0" || s == "-0" {
		return 0, nil // no unit needed: zero is zero in ppm and in percent
	}
	for _, suf := range []string{"/°C", "/ºC", "/degC", "/C", "/K"} {
		if rest, ok := strings.CutSuffix(s, suf); ok {
			s = strings.TrimSpace(rest)
			break
		}
	}
	for _, sign := range []string{"±", "+/-", "+-", "-", "+"} {
		if rest, ok := strings.CutPrefix(s, sign); ok {
			s = strings.TrimSpace(rest)
			break
		}
	}
	if rest, ok := strings.CutSuffix(strings.ToLower(s), "ppm"); ok {
		v, err := strconv.ParseFloat(strings.TrimSpace(rest), 64)
		if err != nil || !(v >= 0) {
			return 0, fmt.Errorf("cannot read %s as a temperature coefficient such as 100ppm", units.Quote(text))
		}
		if v > 1e5 {
			return 0, fmt.Errorf("%s is above 100000 ppm/°C (10 %%/°C), far beyond any resistor; write it like 100ppm", units.Quote(text))
		}
		return v * 1e-6, nil
	}
	if q, err := units.Parse(s); err == nil && q.Unit == units.Percent {
		if !(q.Value >= 0 && q.Value <= 0.1) {
			return 0, fmt.Errorf("%s is above 10 %%/°C, far beyond any resistor; write it like 0.01%%/°C", units.Quote(text))
		}
		return q.Value, nil
	}
	return 0, fmt.Errorf("cannot read %s as a temperature coefficient; write it like 100ppm or 0.01%%/°C", units.Quote(text))
}

// realPart reads `tolerance`, `tcr` and `package` of a part.
func (d *decoder) realPart(p *PartSpec, byName map[string]entry, path, ctx string) bool {
	nerr := len(d.errs)
	if e, ok := byName["tolerance"]; ok {
		tp, tctx := joinKey(path, "tolerance"), label(ctx, "tolerance")
		unit := units.Ohm
		switch p.Kind {
		case solver.VoltageSource:
			unit = units.Volt
		case solver.CurrentSource:
			unit = units.Amp
		}
		if q, err := units.Parse(e.val.Value); e.val.Kind == yaml.ScalarNode && err == nil && q.Unit == units.Percent {
			if q.Value <= 0 || q.Value >= 1 {
				d.errorf(e.val, tp, "%s: must be above 0%% and below 100%%, got %s", tctx, units.Clip(e.val.Value))
			} else {
				p.Tolerance, p.TolRelative = q.Value, true
			}
		} else if v, ok := d.positive(e.val, tp, tctx, unit); ok {
			p.Tolerance = v
			if p.Kind == solver.Resistor && p.Value > 0 && v >= p.Value {
				d.errorf(e.val, tp, "%s: ±%s is as large as the value itself", tctx, units.Clip(e.val.Value))
			}
		}
	}
	if e, ok := byName["tcr"]; ok {
		if v, ok := d.tcr(e.val, joinKey(path, "tcr"), label(ctx, "tcr")); ok {
			p.TCR, p.HasTCR = v, true
		}
	}
	if e, ok := byName["package"]; ok {
		p.Package, _ = d.pkg(e.val, joinKey(path, "package"), label(ctx, "package"))
	}
	return len(d.errs) == nerr
}

// realChoice reads `tolerance`, `tcr` and `package` in choose or an
// override; a tolerance here is always a percentage, since it applies to
// parts of any value.
func (d *decoder) realChoice(c *Choice, byName map[string]entry, path, ctx string) {
	if e, ok := byName["tolerance"]; ok {
		tp, tctx := joinKey(path, "tolerance"), label(ctx, "tolerance")
		q, err := units.Parse(e.val.Value)
		switch {
		case e.val.Kind != yaml.ScalarNode || err != nil || q.Unit != units.Percent:
			d.errorf(e.val, tp, "%s: expected a percentage such as 1%%, got %s", tctx, describe(e.val))
		case q.Value <= 0 || q.Value >= 1:
			d.errorf(e.val, tp, "%s: must be above 0%% and below 100%%, got %s", tctx, units.Clip(e.val.Value))
		default:
			c.Tolerance = q.Value
		}
	}
	if e, ok := byName["tcr"]; ok {
		if v, ok := d.tcr(e.val, joinKey(path, "tcr"), label(ctx, "tcr")); ok {
			c.TCR, c.HasTCR = v, true
		}
	}
	if e, ok := byName["package"]; ok {
		c.Package, _ = d.pkg(e.val, joinKey(path, "package"), label(ctx, "package"))
	}
}

func (d *decoder) tcr(n *yaml.Node, path, ctx string) (float64, bool) {
	if n.Kind != yaml.ScalarNode || isNull(n) {
		d.errorf(n, path, "%s: expected a temperature coefficient such as 100ppm, got %s", ctx, describe(n))
		return 0, false
	}
	v, err := ParseTCR(n.Value)
	if err != nil {
		d.errorf(n, path, "%s: %s", ctx, err.Error())
		return 0, false
	}
	return v, true
}

// pkg reads a package name. YAML would read 0603 as a number; the text as
// written is what counts.
func (d *decoder) pkg(n *yaml.Node, path, ctx string) (string, bool) {
	if n.Kind != yaml.ScalarNode || isNull(n) {
		d.errorf(n, path, "%s: expected a package such as 0603, got %s", ctx, describe(n))
		return "", false
	}
	p, err := ratings.Lookup(n.Value)
	if err != nil {
		d.errorf(n, path, "%s: %s", ctx, Message(err))
		return "", false
	}
	return p.Name, true
}

// ambient reads `ambient: {min: -20, max: 70}` in °C.
func (d *decoder) ambient(n *yaml.Node) {
	if !d.expectMapping(n, "ambient", "ambient", "{min: -20, max: 70}") {
		return
	}
	byName, _ := d.fields(n, "ambient", "ambient", []string{"min", "max"})
	a := Ambient{Pos: Pos{n.Line, n.Column}, Min: ReferenceCelsius, Max: ReferenceCelsius}
	ok := true
	for _, k := range []string{"min", "max"} {
		e, has := byName[k]
		if !has {
			d.missingf(n, joinKey("ambient", k), "ambient: missing key %q (°C)", k)
			ok = false
			continue
		}
		v, err := celsius(e.val.Value)
		if e.val.Kind != yaml.ScalarNode || err != nil {
			d.errorf(e.val, joinKey("ambient", k), "ambient: %s: expected a temperature in °C such as -20, got %s", k, describe(e.val))
			ok = false
			continue
		}
		if k == "min" {
			a.Min = v
		} else {
			a.Max = v
		}
	}
	if ok && a.Min > a.Max {
		d.errorf(byName["max"].val, "ambient.max", "ambient: min (%g °C) is above max (%g °C)", a.Min, a.Max)
		return
	}
	if ok {
		a.Set = true
		d.t.Ambient = a
	}
}

// celsius reads "-20", "85C" or "85°C"; temperatures below absolute zero or
// far beyond any component's range are refused.
func celsius(s string) (float64, error) {
	s = strings.TrimSpace(s)
	for _, suf := range []string{"°C", "ºC", "C"} {
		if rest, ok := strings.CutSuffix(s, suf); ok {
			s = strings.TrimSpace(rest)
			break
		}
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || v < -273.15 || v > 1000 {
		return 0, fmt.Errorf("bad temperature %q", s)
	}
	return v, nil
}

// ParseCelsius reads a temperature in °C as the `ambient` key does ("-20",
// "85C", "85°C"); for command-line flags.
func ParseCelsius(s string) (float64, error) { return celsius(s) }
