package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// tolText shows a part's tolerance: "1%" or "±10 mV".
func tolText(v variation.Varied) string {
	if v.Class != "" {
		return "class " + v.Class
	}
	if v.Tol == 0 {
		return "exact"
	}
	if v.Relative {
		return units.FormatUnit(v.Tol, units.Percent)
	}
	return "±" + units.FormatUnit(v.Tol, unitOf(v.Kind))
}

func unitOf(k solver.Kind) units.Unit {
	switch k {
	case solver.VoltageSource:
		return units.Volt
	case solver.CurrentSource:
		return units.Amp
	}
	return units.Ohm
}

// ppm shows a TCR: "100 ppm/°C".
func ppm(tcr float64) string {
	return strconv.FormatFloat(tcr*1e6, 'g', 4, 64) + " ppm/°C"
}

// worstCaseText says which worst-case method ran.
func worstCaseText(rep *variation.Report, nc int) string {
	if rep.Method == variation.MethodCorners {
		return fmt.Sprintf("every tolerance corner solved (%d per condition, %s)", rep.Corners, counted(nc, "condition", "conditions"))
	}
	return fmt.Sprintf("linearised: %s picked from the sensitivities, each solved exactly (too many varying parts to try all)",
		counted(rep.Corners, "corner", "corners"))
}

// writeCheckTable renders a check report for people.
func writeCheckTable(w io.Writer, t *constraints.Template, d *variation.Design, rep *variation.Report) error {
	var b strings.Builder
	if t.Name != "" {
		fmt.Fprintf(&b, "%s, with real parts\n", t.Name)
	}
	visible := 0 // the conditions output shows, not a derivative's helpers
	for range d.Problem.VisibleConditions() {
		visible++
	}
	fmt.Fprintf(&b, "worst case: %s\n", worstCaseText(rep, visible))
	if rep.Samples > 0 {
		fmt.Fprintf(&b, "Monte Carlo: %s %s, %s, seed %d; %s meet every limit\n", count(float64(rep.Samples)), variation.Plural(rep.Samples, "sample", "samples"),
			rep.Distribution, rep.Seed, yieldText(rep.Yield))
	}
	if a := rep.Ambient; a.Set {
		fmt.Fprintf(&b, "ambient: %g … %g °C (TCR referred to %g °C)\n", a.Min, a.Max, constraints.ReferenceCelsius)
	} else if hasTemperatures(d.Problem) {
		fmt.Fprintf(&b, "temperature: each resistor drifts by its TCR at its condition's temperature (referred to %g °C)\n", constraints.ReferenceCelsius)
	}
	b.WriteByte('\n')
	if err := writeGoalTable(&b, t, rep); err != nil {
		return err
	}
	b.WriteString("\n  sensitivity (dX/X)/(dx/x): relative change of the target per relative change of a part's value, at nominal values\n")
	b.WriteString("  (a sensor's R25 or R0); adjoint method, sweep-wide targets by central differences of full re-solves\n\n")
	sens := table{indent: "  ", cols: []column{{gap: 3}, {gap: 3}}}
	head := []string{"target", "condition"}
	for _, v := range rep.Parts {
		head = append(head, v.Name)
		sens.cols = append(sens.cols, column{right: true, gap: 3})
	}
	sens.cols[len(sens.cols)-1].gap = 0
	sens.add(head...)
	for _, g := range rep.Goals {
		row := []string{g.Label, g.CondName}
		for _, s := range g.Sens {
			row = append(row, sensText(s))
		}
		sens.add(row...)
	}
	if err := sens.write(&b); err != nil {
		return err
	}
	b.WriteByte('\n')
	if err := writePartTable(&b, d, rep); err != nil {
		return err
	}
	if err := writeHeatingTable(&b, rep); err != nil {
		return err
	}
	writeNotes(&b, rep)
	_, err := io.WriteString(w, b.String())
	return err
}

func yieldText(y float64) string {
	return strconv.FormatFloat(100*y, 'f', 2, 64) + "%"
}

func sensText(s variation.Sensitivity) string {
	if math.IsNaN(s.Normalised) {
		return "n/a"
	}
	if math.Abs(s.Normalised) < 5e-5 {
		return "0"
	}
	return strconv.FormatFloat(s.Normalised, 'f', 4, 64)
}

// tailWords names the Monte Carlo tail columns for a run of n samples:
// the 0.135 % and 99.865 % points where it estimates them, else its lowest
// and highest sample (variation.TailsEstimated).
func tailWords(n int) (string, string) {
	if variation.TailsEstimated(n) {
		return "0.135%", "99.865%"
	}
	return "lowest", "highest"
}

// tailKeys is tailWords for JSON.
func tailKeys(n int) (string, string) {
	if variation.TailsEstimated(n) {
		return "p0_135", "p99_865"
	}
	return "lowest", "highest"
}

// writeGoalTable writes one row per target and condition.
func writeGoalTable(b *strings.Builder, t *constraints.Template, rep *variation.Report) error {
	tb := table{indent: "  ", cols: []column{{gap: 3}, {gap: 3}}}
	head := []string{"target", "condition", "nominal", "worst min", "worst max", "limits"}
	if rep.Samples > 0 {
		lo, hi := tailWords(rep.Samples)
		head = append(head, "mean", "σ", lo, hi, "yield")
	}
	for range head[2:] {
		tb.cols = append(tb.cols, column{right: true, gap: 3})
	}
	tb.cols[len(tb.cols)-1].gap = 0
	tb.add(head...)
	// Two rows on one quantity in one condition (a goal and a separate
	// limit on it) would read alike: those say which is which.
	seen := map[[2]string]int{}
	for _, g := range rep.Goals {
		seen[[2]string{g.Label, g.CondName}]++
	}
	for _, g := range rep.Goals {
		tg := t.Targets[g.Target]
		label := g.Label
		if seen[[2]string{g.Label, g.CondName}] > 1 {
			label += " (" + targetKind(tg.HasEquals) + ")"
		}
		limit := wordNoLimit
		if g.HasBand {
			limit = verdictWord(g.InBand)
		}
		k := tg.Kind
		row := []string{label, g.CondName, k.Format(g.Nominal), k.Format(g.WorstMin), k.Format(g.WorstMax), limit}
		if rep.Samples > 0 {
			mc := g.MonteCarlo
			row = append(row, k.Format(mc.Mean), k.FormatSig(mc.Sigma, 4), k.Format(mc.Low), k.Format(mc.High), yieldText(mc.Yield))
		}
		tb.add(row...)
	}
	return tb.write(b)
}

// writePartTable writes one row per varied part with its rating; a sensor
// has no resistor TCR, package rating or verdict, and its model follows.
func writePartTable(b *strings.Builder, d *variation.Design, rep *variation.Report) error {
	rated, sensed := reportLoads(rep)
	tb := table{indent: "  ", cols: []column{{gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {right: true, gap: 3},
		{right: true, gap: 3}, {right: true, gap: 3}, {gap: 3}, {right: true, gap: 3}, {}}}
	tb.add("part", "value", "tolerance", "TCR", "worst power", "worst volts", "package", "load", "verdict")
	var models []string
	for j, v := range rep.Parts {
		if v.Extra() {
			continue // a sensor's B or class terms: on the sensor's line
		}
		if sl, ok := sensed[v.Name]; ok {
			pkg := v.Package
			if pkg == "" {
				pkg = "-"
			}
			tb.add(v.Name, units.FormatUnit(v.Nominal, units.Ohm), tolText(v), "-",
				units.FormatUnit(sl.Watts, units.Watt), units.FormatUnit(sl.Volts, units.Volt), pkg, "-", "sensor")
			tol := fmt.Sprintf(", ±%s (%s)", units.FormatUnit(v.Tol, units.Percent), v.TolFrom)
			if v.Class != "" {
				tol = "" // the class is in the model
			}
			models = append(models, fmt.Sprintf("  %s is an %s, %s%s: its datasheet rates it, not the package table.\n",
				v.Name, variation.SensorKind(v.Sensor), d.SensorSpec(j), tol))
			continue
		}
		r, ok := rated[v.Name]
		if !ok {
			tb.add(v.Name, units.FormatUnit(v.Nominal, unitOf(v.Kind)), tolText(v), "", "", "", "", "", "")
			continue
		}
		pkg := r.Package
		if r.Chosen {
			pkg += " (smallest)"
		}
		tb.add(v.Name, units.FormatUnit(v.Nominal, units.Ohm), tolText(v), ppm(v.TCR),
			units.FormatUnit(r.Watts, units.Watt), units.FormatUnit(r.Volts, units.Volt), pkg,
			loadText(r.Load.PowerFraction), string(r.Verdict))
	}
	if err := tb.write(b); err != nil {
		return err
	}
	if len(models) > 0 {
		b.WriteByte('\n')
		for _, m := range models {
			b.WriteString(m)
		}
	}
	return nil
}

// reportLoads indexes a report's resistor ratings and sensor loads by part.
func reportLoads(rep *variation.Report) (map[string]variation.Rating, map[string]variation.SensorLoad) {
	rated := map[string]variation.Rating{}
	for _, r := range rep.Ratings {
		rated[r.Part] = r
	}
	sensed := map[string]variation.SensorLoad{}
	for _, s := range rep.Sensors {
		sensed[s.Part] = s
	}
	return rated, sensed
}

// writeHeatingTable writes each sensor's self-heating per condition, when
// a sensor has a dissipation constant.
func writeHeatingTable(b *strings.Builder, rep *variation.Report) error {
	if len(rep.Heating) == 0 {
		return nil
	}
	b.WriteString("\n  self-heating at nominal values: rise = P/δ at the condition's temperature; reading error = how far the sensor\n")
	b.WriteString("  settles above it (fixed point of T = T0 + P(T)/δ), which is what a reading from it is off by\n\n")
	tb := table{indent: "  ", cols: []column{{gap: 3}, {gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {right: true}}}
	tb.add("sensor", "condition", "power", "rise", "reading error", "steps")
	for _, h := range rep.Heating {
		read := "does not settle"
		if h.Converged {
			read = celsius(h.ReadingError)
		}
		tb.add(h.Part, h.CondName, units.FormatUnit(h.Watts, units.Watt), celsius(h.Rise), read, strconv.Itoa(h.Steps))
	}
	return tb.write(b)
}

// celsius writes a temperature difference with four significant digits
// and no SI prefix: "0.06787 °C".
func celsius(v float64) string {
	return strconv.FormatFloat(v, 'g', 4, 64) + " °C"
}

// writeNotes writes the warnings, cautions and hard failures.
func writeNotes(b *strings.Builder, rep *variation.Report) {
	b.WriteString("\n  load is worst-case power over rated power; packages carry at most 50% (derating, common practice).\n")
	b.WriteString("  Ratings are typical thick-film figures from memory: check the datasheet of the part you buy.\n")
	for _, f := range rep.Failures {
		fmt.Fprintf(b, "\n%s: %s\n", wordFail, f)
	}
	if len(rep.Warnings) > 0 {
		b.WriteString("\nwarnings:\n")
		for _, w := range rep.Warnings {
			fmt.Fprintf(b, "  - %s\n", w)
		}
	}
	for _, c := range rep.Cautions {
		fmt.Fprintf(b, "\n%s\n", c)
	}
}

// finite returns v, or nil for a NaN or infinity, which JSON cannot hold.
func finite(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

// checkJSON builds the check document: the contract's keys and the rest of
// what the table shows, led by lead (check: the template's name; fit --check:
// the answer's rank).
func checkJSON(lead member, t *constraints.Template, d *variation.Design, rep *variation.Report) object {
	parts, sources := partsJSON(t, d, rep)
	var amb any
	if a := rep.Ambient; a.Set {
		amb = object{{"min", a.Min}, {"max", a.Max}, {"reference", constraints.ReferenceCelsius}}
	}
	mc := any(nil)
	if rep.Samples > 0 {
		mc = object{{"samples", rep.Samples}, {"seed", rep.Seed}, {"distribution", rep.Distribution.String()}, {"yield", rep.Yield}}
	}
	var heating []object
	for _, h := range rep.Heating {
		heating = append(heating, object{{"sensor", h.Part}, {"condition", h.CondName}, {"watts", h.Watts}, {"rise", h.Rise},
			{"reading_error", finite(h.ReadingError)}, {"steps", h.Steps}, {"converged", h.Converged}})
	}
	doc := object{
		lead,
		{"worst_case", object{{"method", rep.Method}, {"corners", rep.Corners}}},
		{"monte_carlo", mc},
		{"ambient", amb},
		{"goals", goalsJSON(t, rep)},
		{"parts", parts},
		{"sources", sources},
		{"span_volts", rep.MaxVolts}, // the largest voltage between two nodes
		{"warnings", nonNil(rep.Warnings)},
		{"cautions", nonNil(rep.Cautions)},
		{"failures", nonNil(rep.Failures)},
	}
	if len(heating) > 0 {
		// Only for a design whose sensors have a dissipation constant,
		// after the other keys.
		doc = append(doc, member{"self_heating", heating})
	}
	return doc
}

// goalsJSON is the check document's "goals": one object per target and
// condition.
func goalsJSON(t *constraints.Template, rep *variation.Report) []object {
	goals := make([]object, len(rep.Goals))
	for i, g := range rep.Goals {
		tg := t.Targets[g.Target]
		sens := object{}
		for _, s := range g.Sens {
			sens = append(sens, member{s.Part, finite(s.Normalised)})
		}
		m := object{{"target", g.Label}, {"kind", targetKind(tg.HasEquals)}, {"condition", g.CondName}, {"nominal", g.Nominal},
			{"worst_min", g.WorstMin}, {"worst_max", g.WorstMax}}
		if tg.HasEquals {
			m = append(m, member{"goal", tg.Equals}, member{"worst_error", finite(g.WorstError)})
		}
		lo, hi := tg.Band()
		m = append(m, member{"min", finite(lo)}, member{"max", finite(hi)}, member{"pass", g.Pass()})
		if rep.Samples > 0 {
			mc := g.MonteCarlo
			klo, khi := tailKeys(rep.Samples)
			m = append(m, member{"monte_carlo", object{{"mean", finite(mc.Mean)}, {"sigma", finite(mc.Sigma)},
				{klo, finite(mc.Low)}, {khi, finite(mc.High)}, {"yield", mc.Yield}, {"failed", mc.Failed}}})
		}
		m = append(m, member{"sensitivities", sens})
		goals[i] = m
	}
	return goals
}

// partsJSON is the check document's "parts" (resistors with their ratings,
// sensors with their models) and "sources".
func partsJSON(t *constraints.Template, d *variation.Design, rep *variation.Report) (parts, sources []object) {
	rated, sensed := reportLoads(rep)
	parts, sources = []object{}, []object{}
	for j, v := range rep.Parts {
		if v.Extra() {
			continue // a sensor's B or class terms: on the sensor's object
		}
		base := object{{"name", v.Name}, {"value", v.Nominal}, {"tolerance", v.Tol}, {"tolerance_relative", v.Relative}, {"tolerance_from", v.TolFrom}}
		if sl, ok := sensed[v.Name]; ok {
			var pkg any
			if v.Package != "" {
				pkg = v.Package
			}
			obj := append(base,
				member{"position", v.Position}, member{"type", v.Sensor}, member{"model", d.SensorSpec(j)},
				member{"watts", sl.Watts}, member{"nominal_watts", sl.NominalWatts}, member{"volts", sl.Volts},
				member{"package", pkg})
			ps := t.Parts[v.Part]
			if ps.BetaTolerance > 0 {
				obj = append(obj, member{"beta_tolerance", ps.BetaTolerance})
			}
			if ps.Class != "" {
				obj = append(obj, member{"class", ps.Class})
			}
			parts = append(parts, obj)
			continue
		}
		r, ok := rated[v.Name]
		if !ok {
			sources = append(sources, base)
			continue
		}
		parts = append(parts, append(base,
			member{"position", v.Position}, member{"type", variation.TypeResistor}, member{"series", v.Series}, member{"tcr", v.TCR},
			member{"watts", r.Watts}, member{"nominal_watts", r.NominalWatts}, member{"volts", r.Volts},
			member{"package", r.Package}, member{"package_chosen", r.Chosen},
			member{"rated_watts", r.Rated}, member{"rated_volts", r.MaxVolts},
			member{"power_fraction", r.Load.PowerFraction}, member{"voltage_fraction", r.Load.VoltageFraction},
			member{"verdict", r.Verdict}))
	}
	return parts, sources
}

// hasTemperatures reports whether any condition carries a temperature.
func hasTemperatures(p *constraints.Problem) bool {
	for _, c := range p.Conditions {
		if c.HasTemperature {
			return true
		}
	}
	return false
}

// loadText writes a part's load (a fraction of its rated power) as a
// whole percentage, in powers of ten past a million per cent rather than a
// line of digits.
func loadText(f float64) string {
	if p := 100 * f; p >= 1e6 {
		return strconv.FormatFloat(p, 'e', 1, 64) + "%"
	}
	return strconv.FormatFloat(100*f, 'f', 0, 64) + "%"
}
