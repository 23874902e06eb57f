package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"ssbkit/hilbert"
)

func TestAnalogReport(t *testing.T) {
	dir := t.TempDir()
	bom, png := filepath.Join(dir, "bom.csv"), filepath.Join(dir, "net.png")
	code, out, errs := runCmd(t, "analog", "--sections", "6", "--series", "E96", "--json", "--bom", bom, "--plot", png, "--trials", "500")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Sections     int     `json:"sections"`
		IdealMinDB   float64 `json:"ideal_min_db"`
		SnappedMinDB float64 `json:"snapped_min_db"`
		Parts        []struct {
			Path      string  `json:"path"`
			PoleHz    float64 `json:"pole_hz"`
			RIdealOhm float64 `json:"r_ideal_ohm"`
			ROhm      float64 `json:"r_ohm"`
			CF        float64 `json:"c_f"`
		} `json:"parts"`
		MonteCarlo struct {
			Trials                int
			MedianDB, P5DB, P1DB  float64
			Yield                 float64
			RTolPct, CTolPct      float64
			Distribution, Quantil string
		} `json:"montecarlo"`
		Sensitivity []struct {
			Part   string  `json:"part"`
			DropDB float64 `json:"drop_db"`
		} `json:"sensitivity"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	// The ideal figure is the closed form (checked in package hilbert
	// against the equiripple alternation and the digital pair).
	const tolDB = 0.01
	if want := hilbert.AnalogSuppressionDB(6, 300, 2700); math.Abs(r.IdealMinDB-want) > tolDB {
		t.Errorf("ideal %.2f dB, closed form %.2f dB", r.IdealMinDB, want)
	}
	if !(r.SnappedMinDB < r.IdealMinDB) || len(r.Parts) != 6 || r.Sections != 6 {
		t.Errorf("snapped %.2f dB, %d parts", r.SnappedMinDB, len(r.Parts))
	}
	e96, _ := hilbert.Series("E96")
	for _, p := range r.Parts {
		// R = 1/(2πfC) for the fixed 10 nF; the snapped R is an E96 value.
		if want := 1 / (2 * math.Pi * p.PoleHz * 10e-9); math.Abs(p.RIdealOhm-want) > 1e-4*want || p.CF != 10e-9 {
			t.Errorf("pole %g Hz: R ideal %g, want %g", p.PoleHz, p.RIdealOhm, want)
		}
		if s := hilbert.Snap(p.ROhm, e96); s != p.ROhm {
			t.Errorf("R %g is not an E96 value", p.ROhm)
		}
	}
	m := r.MonteCarlo
	if m.Trials != 500 || !(m.P1DB <= m.P5DB && m.P5DB <= m.MedianDB && m.MedianDB <= r.SnappedMinDB) || m.Yield < 0 || m.Yield > 1 {
		t.Errorf("Monte Carlo %+v", m)
	}
	if len(r.Sensitivity) != 24 || r.Sensitivity[0].DropDB < r.Sensitivity[23].DropDB {
		t.Errorf("sensitivity: %d entries, not sorted", len(r.Sensitivity))
	}
	// The parts list: 3 resistors, 1 capacitor and 1 op-amp per section.
	f, err := os.Open(bom)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil || strings.Join(recs[0], ",") != "item,quantity,references,part,value,unit,value_si,tolerance_pct,series,note" {
		t.Fatalf("bom: %v %q", err, recs)
	}
	count := map[string]int{}
	for _, rec := range recs[1:] {
		q, _ := strconv.Atoi(rec[1])
		count[rec[3]] += q
		if len(strings.Fields(rec[2])) != q {
			t.Errorf("bom row %q: quantity and references disagree", rec)
		}
	}
	if count["resistor"] != 18 || count["capacitor"] != 6 || count["op-amp"] != 6 {
		t.Errorf("bom counts %v", count)
	}
	if p, _ := os.ReadFile(png); len(p) < 1000 || string(p[1:4]) != "PNG" {
		t.Errorf("no plot")
	}
}

func TestAnalogTextAndTarget(t *testing.T) {
	// --target alone picks the fewest sections: the closed form gives
	// 29.89 dB for 3 and 41.87 dB for 4 sections over 300–2700 Hz.
	code, out, errs := runCmd(t, "analog", "--target", "40", "--trials", "200")
	if code != exitOK || !strings.Contains(out, "4 sections (I 2, Q 2)") || !strings.Contains(out, "ideal parts 41.87 dB") ||
		!strings.Contains(out, "yield for 40 dB") || !strings.Contains(out, "1st percentile") {
		t.Errorf("exit %d %s\n%s", code, errs, out)
	}
	// --fix r: the capacitors are computed and snapped.
	code, out, errs = runCmd(t, "analog", "--fix", "r", "--r", "22k", "--series", "E12", "--trials", "50", "--distribution", "gaussian")
	if code != exitOK || !strings.Contains(out, "R fixed at 22 kΩ, C snapped to E12") || !strings.Contains(out, "gaussian (tolerance = 3σ)") {
		t.Errorf("exit %d %s\n%s", code, errs, out)
	}
	// The caution is in the help.
	_, help, _ := runCmd(t, "analog", "--help")
	for _, s := range []string{"layout", "op-amp", "licensed practice"} {
		if !strings.Contains(help, s) {
			t.Errorf("help lacks %q", s)
		}
	}
}

func TestAnalogBadInput(t *testing.T) {
	checkUsageErrors(t, "analog", nil, []usageCase{
		{[]string{"--r-tol", "-1"}, "--r-tol -1"},
		{[]string{"--c-tol", "50"}, "below 50"},
		{[]string{"--series", "E7"}, "unknown series"},
		{[]string{"--sections", "0"}, "--sections 0"},
		{[]string{"--sections", "17"}, "1 to 16"},
		{[]string{"--band", "0:2700"}, "0 < LOW"},
		{[]string{"--band", "2700:300"}, "LOW must be below HIGH"},
		{[]string{"--band", "300:inf"}, "--band"},
		{[]string{"--trials", "0"}, "--trials 0"},
		{[]string{"--trials", "100000000"}, "1 to 100000"},
		{[]string{"--fix", "l"}, "want c or r"},
		{[]string{"--c", "-10n"}, "--c"},
		{[]string{"--c", "ten"}, "--c"},
		{[]string{"--fix", "r", "--c", "10n"}, "--c applies to --fix c"},
		{[]string{"--r", "10k"}, "--r applies to --fix r"},
		{[]string{"--distribution", "cauchy"}, "uniform or gaussian"},
		{[]string{"--target", "400"}, "--target"},
		{[]string{"--target", "250", "--band", "300:3000"}, "reach only"},
		{[]string{"--points", "8"}, "--points"},
		{[]string{"--band", "300:1e308"}, "1 Hz to 10 MHz"},
		{[]string{"--band", "0.5:3000"}, "1 Hz to 10 MHz"},
		{[]string{"--c", "1e-320"}, "want 1 pF to 1 F"},
		{[]string{"--fix", "r", "--r", "0.1"}, "want 1 Ω to 1 GΩ"},
		{[]string{"--r-gain", "1e12"}, "--r-gain"},
		{[]string{"--bom", "-"}, "needs a file"},
		{[]string{"extra"}, "no arguments"},
	})
}

func TestParsePart(t *testing.T) {
	// Builders' notation (common practice): SI prefixes, the prefix as
	// the decimal point (4k7), an optional unit.
	for _, c := range []struct {
		s    string
		unit string
		want float64
	}{
		{"10n", "F", 10e-9}, {"4.7nF", "F", 4.7e-9}, {"0.01u", "F", 10e-9}, {"100p", "F", 100e-12}, {"1µF", "F", 1e-6},
		{"4k7", "Ω", 4700}, {"22k", "Ω", 22e3}, {"1M", "Ω", 1e6}, {"10kΩ", "Ω", 10e3}, {"470", "Ω", 470}, {"1e-8", "F", 1e-8}, {"4.7 nF", "F", 4.7e-9},
	} {
		got, err := parsePart("--x", c.s, c.unit)
		if err != nil || math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("parsePart(%q) = %g, %v; want %g", c.s, got, err, c.want)
		}
	}
	for _, s := range []string{"", "k", "-1k", "0", "4k7.1", "nan", "inf", "1x", "0x10"} {
		if _, err := parsePart("--x", s, "Ω"); err == nil {
			t.Errorf("parsePart(%q) accepted", s)
		}
	}
}

func TestFmtSI(t *testing.T) {
	for _, c := range []struct {
		v    float64
		unit string
		d    int
		want string
	}{{174000, "Ω", 3, "174 kΩ"}, {4.7e-9, "F", 3, "4.7 nF"}, {1791.04, "Ω", 4, "1.791 kΩ"}, {999.96, "Ω", 3, "1 kΩ"}, {1e-8, "F", 3, "10 nF"}, {2.2e6, "Ω", 3, "2.2 MΩ"}} {
		if got := fmtSI(c.v, c.unit, c.d); got != c.want {
			t.Errorf("fmtSI(%g) = %q, want %q", c.v, got, c.want)
		}
	}
}

func FuzzParsePart(f *testing.F) {
	// Seeds in testdata/fuzz/FuzzParsePart. No input panics; an accepted
	// value is positive and finite, errors are one line, and a value
	// printed plainly reads back the same.
	f.Add("4k7")
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 256 {
			return
		}
		v, err := parsePart("--x", s, "Ω")
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Fatalf("%q: error of more than one line", s)
			}
			return
		}
		if !(v > 0) || math.IsInf(v, 0) {
			t.Fatalf("%q: accepted %v", s, v)
		}
		text := strconv.FormatFloat(v, 'g', -1, 64)
		if back, err := parsePart("--x", text, "Ω"); err != nil || back != v {
			t.Fatalf("%q = %v; %q reads back as %v, %v", s, v, text, back, err)
		}
	})
}
