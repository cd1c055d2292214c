package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestWriteAtomic checks that an output lands whole, that an input is never
// written over (by path or as the same file), and that no temporary file is
// left behind.
func TestWriteAtomic(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "design.yaml")
	if err := os.WriteFile(in, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "bom.csv")
	w := func(w io.Writer) error { _, err := io.WriteString(w, "a,b\n"); return err }
	if err := writeAtomic(out, []string{in}, w); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(out); string(b) != "a,b\n" {
		t.Errorf("output %q", b)
	}
	link := filepath.Join(dir, "alias.yaml")
	if err := os.Link(in, link); err != nil {
		t.Skip("no hard links here")
	}
	for _, target := range []string{in, link, filepath.Join(dir, ".", "design.yaml")} {
		t.Run(target, func(t *testing.T) {
			if err := writeAtomic(target, []string{in}, w); err == nil || exitCodeOf(err) != ExitBadInput {
				t.Errorf("writing over %s: %v, want a refusal", target, err)
			}
		})
	}
	if b, _ := os.ReadFile(in); string(b) != "keep" {
		t.Errorf("input changed to %q", b)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), ".tmp") {
			t.Errorf("temporary file left: %s", e.Name())
		}
	}
}

// TestCheckBOMAndPlot runs check with --bom and --plot and reads the CSV
// back: one line per distinct part, designators grouped, quantities adding
// up to the resistor count; the SVG and PNG files are non-empty images.
// The design breaks its band in the worst case (exit 1): the report and
// its files are still written.
func TestCheckBOMAndPlot(t *testing.T) {
	dir := t.TempDir()
	bom := filepath.Join(dir, "bom.csv")
	for _, img := range []string{"mc.svg", "mc.png"} {
		t.Run(img, func(t *testing.T) {
			_, errOut, code := runCLI(t, "check", "testdata/check-divider.yaml", "--samples", "300", "--bom", bom, "--plot", filepath.Join(dir, img))
			if code != ExitNoSolution {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			b, err := os.ReadFile(filepath.Join(dir, img))
			if err != nil || len(b) < 500 {
				t.Errorf("%s: %d bytes, %v", img, len(b), err)
			}
			if strings.HasSuffix(img, ".svg") && !strings.Contains(string(b), "<svg") {
				t.Errorf("%s is not SVG", img)
			}
			if strings.HasSuffix(img, ".png") && !strings.HasPrefix(string(b), "\x89PNG") {
				t.Errorf("%s is not PNG", img)
			}
		})
	}
	rows := readCSV(t, bom)
	if strings.Join(rows[0], ",") != strings.Join(bomHeader, ",") {
		t.Errorf("header %q", rows[0])
	}
	want := map[string]string{"R1": "1", "R2": "1", "R3, R4": "2"}
	if len(rows)-1 != len(want) {
		t.Errorf("%d part lines, want %d: %q", len(rows)-1, len(want), rows)
	}
	for _, r := range rows[1:] {
		if want[r[0]] != r[len(r)-1] {
			t.Errorf("line %q: quantity %s, want %s", r[0], r[len(r)-1], want[r[0]])
		}
	}
}

// TestFitPlotAndBOM runs fit with --plot (Pareto picture) and --bom for
// rank 2.
func TestFitPlotAndBOM(t *testing.T) {
	dir := t.TempDir()
	_, errOut, code := runCLI(t, "fit", "example:divider", "--workers", "1", "--plot", filepath.Join(dir, "front.svg"), "--bom", filepath.Join(dir, "bom.csv"), "--rank", "2")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	b, err := os.ReadFile(filepath.Join(dir, "front.svg"))
	if err != nil || !strings.Contains(string(b), wordPowerFront) {
		t.Errorf("plot: %v, legend missing", err)
	}
	// The staircase is the front on error and power alone; calling it the
	// trade-off front (error, power and count) would claim more than it shows.
	if strings.Contains(string(b), wordFront) {
		t.Errorf("plot legend says %q of a line that ignores the part count", wordFront)
	}
	c, err := os.ReadFile(filepath.Join(dir, "bom.csv"))
	if err != nil || !strings.Contains(string(c), "3K6") {
		t.Errorf("bom for rank 2 (3.6k, 8.2k): %q, %v", c, err)
	}
}

// TestFitBOMRankAlias: --bom-rank, the old name of fit's --rank, still
// picks the same answer, says it is the old name, is hidden from the help,
// and cannot be given beside --rank (one would silently win).
func TestFitBOMRankAlias(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"--rank", "--bom-rank"} {
		t.Run(name, func(t *testing.T) {
			bom := filepath.Join(dir, name[2:]+".csv")
			_, errOut, code := runCLI(t, "fit", "example:divider", "--workers", "1", "--bom", bom, name, "2")
			if code != ExitOK {
				t.Fatalf("exit %d: %s", code, errOut)
			}
			if c, err := os.ReadFile(bom); err != nil || !strings.Contains(string(c), "3K6") {
				t.Errorf("bom for rank 2 (3.6k, 8.2k): %q, %v", c, err)
			}
			if old := strings.Contains(errOut, "old name of --rank"); old != (name == "--bom-rank") {
				t.Errorf("%s: stderr %q: want the old-name note only for --bom-rank", name, errOut)
			}
		})
	}
	if _, errOut, code := runCLI(t, "fit", "example:divider", "--rank", "2", "--bom-rank", "3"); code != ExitBadInput || !strings.Contains(errOut, "give one of them") {
		t.Errorf("--rank with --bom-rank: exit %d, %q; want a refusal", code, errOut)
	}
	help, _, _ := runCLI(t, "fit", "--help")
	if strings.Contains(help, "bom-rank") || !strings.Contains(help, "--rank N") {
		t.Errorf("fit --help should show --rank N and hide --bom-rank:\n%s", help)
	}
}

// readCSV reads a whole CSV file.
func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return rows
}

// bomRows reads a BOM file into one map per line, keyed by the header.
func bomRows(t *testing.T, path string) []map[string]string {
	t.Helper()
	rows := readCSV(t, path)
	var out []map[string]string
	for _, r := range rows[1:] {
		m := map[string]string{}
		for i, h := range rows[0] {
			m[h] = r[i]
		}
		out = append(out, m)
	}
	return out
}

// TestBOMSensors writes the BOM of a design with a thermistor and an RTD
// beside resistors, one of the same 10k value as the thermistor's R25. A
// sensor is a line of its own, described by its model (R25 and B, R0 and
// the coefficients), its given tolerance (an RTD's ±1.2 Ω is 0.12 % of its
// R0 of 1 kΩ) and only the package the template names; no resistor TCR or
// package rating. A resistor's absolute ±20 Ω on 2 kΩ is 1 %.
func TestBOMSensors(t *testing.T) {
	bom := filepath.Join(t.TempDir(), "bom.csv")
	if _, errOut, code := runCLI(t, "check", "testdata/check-sensors.yaml", "--samples", "0", "--bom", bom); code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	want := []map[string]string{
		{"designators": "Rb, Rc", "type": "resistor", "value": "10 kΩ", "code": "10K", "series": "E24", "tolerance": "1%",
			"tolerance_from": "part", "tcr_ppm_per_c": "100", "model": "", "package": "0201", "power_rating_w": "0.05", "quantity": "2"},
		{"designators": "RT1", "type": "ntc", "value": "10 kΩ", "code": "", "series": "", "tolerance": "3%",
			"tolerance_from": "part", "tcr_ppm_per_c": "", "model": "R25 10 kΩ, B 3950 K", "package": "", "power_rating_w": "", "quantity": "1"},
		{"designators": "PT1", "type": "rtd", "value": "1 kΩ", "code": "", "series": "", "tolerance": "0.12%",
			"tolerance_from": "part", "tcr_ppm_per_c": "", "model": "R0 1 kΩ, IEC 60751 coefficients", "package": "0603", "power_rating_w": "", "quantity": "1"},
		{"designators": "Rd", "type": "resistor", "value": "2 kΩ", "code": "2K0", "series": "E24", "tolerance": "1%",
			"tolerance_from": "part", "tcr_ppm_per_c": "100", "model": "", "package": "0201", "power_rating_w": "0.05", "quantity": "1"},
	}
	got := bomRows(t, bom)
	if len(got) != len(want) {
		t.Fatalf("%d lines, want %d: %v", len(got), len(want), got)
	}
	for i, w := range want {
		for k, v := range w {
			if got[i][k] != v {
				t.Errorf("line %d (%s): %s = %q, want %q", i+1, w["designators"], k, got[i][k], v)
			}
		}
	}

	// The check's table and JSON describe the sensors the same way.
	out, errOut, code := runCLI(t, "check", "testdata/check-sensors.yaml", "--samples", "0", "--format", "json")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var doc struct {
		Parts []map[string]any `json:"parts"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	seen := 0
	for _, p := range doc.Parts {
		switch p["name"] {
		case "RT1", "PT1":
			seen++
			for _, k := range []string{"series", "tcr", "rated_watts", "verdict"} {
				if _, ok := p[k]; ok {
					t.Errorf("%s: JSON has resistor key %q: %v", p["name"], k, p[k])
				}
			}
			if p["type"] != map[string]string{"RT1": "ntc", "PT1": "rtd"}[p["name"].(string)] || p["model"] == "" {
				t.Errorf("%s: type %v, model %v", p["name"], p["type"], p["model"])
			}
		default:
			if p["type"] != "resistor" {
				t.Errorf("%s: type %v", p["name"], p["type"])
			}
		}
	}
	if seen != 2 {
		t.Errorf("%d sensors among the JSON parts, want 2", seen)
	}
	table, errOut, code := runCLI(t, "check", "testdata/check-sensors.yaml", "--samples", "0")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	golden(t, "check-sensors", table)
}

// TestFitBOMSensor writes fit's BOM for the battery-sense example, whose
// answer puts a 10k resistor above a 10k thermistor: two lines, one of
// each, and the thermistor's tolerance, given nowhere, marked as assumed.
func TestFitBOMSensor(t *testing.T) {
	bom := filepath.Join(t.TempDir(), "bom.csv")
	if _, errOut, code := runCLI(t, "fit", "example:battery-sense", "--workers", "1", "--bom", bom); code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	types := map[string]string{}
	for _, r := range bomRows(t, bom) {
		types[r["designators"]] = r["type"] + " " + r["value"] + " " + r["tolerance"] + " " + r["tolerance_from"]
	}
	want := map[string]string{"Rtop": "resistor 10 kΩ 5% series", "RT1": "ntc 10 kΩ 1% assumed", "Rpar": "resistor 1 MΩ 5% series"}
	if fmt.Sprint(types) != fmt.Sprint(want) {
		t.Errorf("lines %v, want %v", types, want)
	}
}

// TestHistogramAxisLabel: a histogram's axis label names no unit of its
// own, since its ticks carry SI units with prefixes ("691 mV"); a label
// "(V)" over mV ticks would misread by a factor of a thousand.
func TestHistogramAxisLabel(t *testing.T) {
	svg := filepath.Join(t.TempDir(), "mc.svg")
	if _, errOut, code := runCLI(t, "check", "example:feedback", "--samples", "200", "--plot", svg); code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	b, err := os.ReadFile(svg)
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	if !strings.Contains(s, ">voltage fb<") || strings.Contains(s, "voltage fb (V)") || !strings.Contains(s, " mV<") {
		t.Errorf("want the label \"voltage fb\" over mV ticks; the SVG has %d bytes", len(s))
	}
}

// TestCheckSelfHeatingAndClass checks a design with the sensor features of
// the sensors issue through the CLI: the self-heating table and its JSON
// (present only here, after the other keys), the B tolerance and the IEC
// 60751 class on the sensors' JSON objects and BOM lines, and the ADC's
// input parts, which are neither parts to buy nor varied.
func TestCheckSelfHeatingAndClass(t *testing.T) {
	file := "testdata/check-heated.yaml"
	table, errOut, code := runCLI(t, "check", file, "--samples", "0")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	golden(t, "check-heated", table)
	out, errOut, code := runCLI(t, "check", file, "--samples", "0", "--format", "json")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var doc struct {
		Parts []map[string]any `json:"parts"`
		Heat  []map[string]any `json:"self_heating"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Heat) != 6 { // two sensors, three conditions
		t.Errorf("%d self_heating rows, want 6", len(doc.Heat))
	}
	for _, h := range doc.Heat {
		if h["converged"] != true || h["reading_error"] == nil {
			t.Errorf("row %v did not settle", h)
		}
	}
	got := map[string]string{}
	for _, p := range doc.Parts {
		got[fmt.Sprint(p["name"])] = fmt.Sprint(p["type"], " ", p["beta_tolerance"], " ", p["class"])
	}
	want := map[string]string{"Rb": "resistor <nil> <nil>", "RT1": "ntc 0.01 <nil>", "PT1": "rtd <nil> A"}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("parts %v, want %v", got, want)
	}
	bom := filepath.Join(t.TempDir(), "bom.csv")
	if _, errOut, code := runCLI(t, "check", file, "--samples", "0", "--bom", bom); code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	lines := map[string]string{}
	for _, r := range bomRows(t, bom) {
		lines[r["designators"]] = r["tolerance_from"] + " | " + r["model"]
	}
	wantBOM := map[string]string{
		"Rb":  "part | ",
		"RT1": "part | R25 10 kΩ, B 3900 K ±1%",
		"PT1": "class | R0 1 kΩ, IEC 60751 coefficients, class A (IEC 60751: ±(0.15 + 0.002·|t|) °C)",
	}
	if fmt.Sprint(lines) != fmt.Sprint(wantBOM) {
		t.Errorf("BOM %v, want %v", lines, wantBOM)
	}
}
