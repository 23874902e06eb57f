package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"ssbkit/hilbert"
	"ssbkit/iq"
)

const analogUsage = `ssbkit analog [--band LOW:HIGH] [--sections N | --target DB] [--fix c|r] [--c VALUE | --r VALUE] [--series E6|E12|E24|E48|E96|E192] [--r-tol PCT] [--c-tol PCT] [--distribution uniform|gaussian] [--trials N] [--seed N] [--bom FILE.csv] [--plot FILE.png] [--json] [-o PATH]`

const analogExamples = `Designs an analog 90° phasing network for a phasing exciter or receiver:
two chains of op-amp first-order all-pass sections (input → R → non-
inverting input, C to ground; Rin and Rf, equal, around the op-amp;
pole f = 1/(2πRC)), equiripple in phase over the band. Prints each
section's pole and parts, ideal and snapped to a preferred series (IEC
60063), the suppression of the opposite sideband each gives, a Monte
Carlo over the parts' tolerances (minimum suppression over the band:
median, 5th and 1st percentile, and the yield for --target) and the
parts that matter most. --sections counts the sections of both paths
together; without it, --target picks the fewest sections that reach it
(ideal parts), else 6 sections. Percentiles are empirical quantiles
(gonum stat.Empirical); --distribution gaussian takes the tolerance as
3σ. --bom writes a parts list (CSV) to order from; --plot draws
suppression against frequency: ideal, snapped and the Monte Carlo spread.

CAUTION: the model is ideal op-amps and exact section gains. The op-amp's
gain-bandwidth and noise, source and load impedances, layout, and the
matching of parts and op-amps between the paths matter beyond it; trim
and measure the built network (for example with "ssbkit measure" on a
recording). Anything that goes on the air follows licensed practice:
the right licence and band, spectral purity checked first, local
regulations first.

Examples:
  ssbkit analog
  ssbkit analog --sections 8 --series E96 --r-tol 1 --c-tol 2 --plot net8.png --bom net8.csv
  ssbkit analog --target 40 --band 200:3000 --c 4.7n --series E192 --json
  ssbkit analog --fix r --r 22k --series E12 --c-tol 5 --distribution gaussian`

// maxTrials caps --trials: 100000 trials of 16 sections over 4096
// frequencies take about half a minute; more add nothing to 1st
// percentiles.
const maxTrials = 100000

// analogReport is the --json output.
type analogReport struct {
	BandHz        [2]float64          `json:"band_hz"`
	Sections      int                 `json:"sections"`
	Fix           string              `json:"fix"`
	Series        string              `json:"series"`
	FixedValue    float64             `json:"fixed_value"`
	GainOhm       float64             `json:"gain_resistor_ohm"`
	IdealMinDB    float64             `json:"ideal_min_db"`
	IdealMeanDB   float64             `json:"ideal_mean_db"`
	SnappedMinDB  float64             `json:"snapped_min_db"`
	SnappedMeanDB float64             `json:"snapped_mean_db"`
	DelayMS       float64             `json:"delay_ms"`
	TargetDB      float64             `json:"target_db"`
	Parts         []analogPart        `json:"parts"`
	MonteCarlo    analogMC            `json:"montecarlo"`
	Sensitivity   []analogSensitivity `json:"sensitivity"`
	ModelCaveat   string              `json:"model"`
}

type analogPart struct {
	Section       int     `json:"section"`
	Path          string  `json:"path"`
	PoleHz        float64 `json:"pole_hz"`
	RIdealOhm     float64 `json:"r_ideal_ohm"`
	CIdealF       float64 `json:"c_ideal_f"`
	ROhm          float64 `json:"r_ohm"`
	CF            float64 `json:"c_f"`
	PoleSnappedHz float64 `json:"pole_snapped_hz"`
	RRef          string  `json:"r_ref"`
	CRef          string  `json:"c_ref"`
	RinRef        string  `json:"rin_ref"`
	RfRef         string  `json:"rf_ref"`
	OpAmpRef      string  `json:"opamp_ref"`
}

type analogMC struct {
	Trials       int     `json:"trials"`
	Seed         uint64  `json:"seed"`
	Distribution string  `json:"distribution"`
	RTolPct      float64 `json:"r_tol_pct"`
	CTolPct      float64 `json:"c_tol_pct"`
	Points       int     `json:"points"`
	Quantile     string  `json:"quantile"`
	MedianDB     float64 `json:"median_db"`
	P5DB         float64 `json:"p5_db"`
	P1DB         float64 `json:"p1_db"`
	Yield        float64 `json:"yield"`
}

type analogSensitivity struct {
	Part          string  `json:"part"`
	Section       int     `json:"section"`
	Path          string  `json:"path"`
	Role          string  `json:"role"`
	TolerancePct  float64 `json:"tolerance_pct"`
	DropDB        float64 `json:"drop_db"`
	SlopeDBPerPct float64 `json:"slope_db_per_pct"`
}

// Designators: section i (0-based, I sections first) has R3i+1 setting
// the pole, R3i+2 = Rin, R3i+3 = Rf, C(i+1) and op-amp U(i+1).
func refs(i int) (r, c, rin, rf, u string) {
	return fmt.Sprintf("R%d", 3*i+1), fmt.Sprintf("C%d", i+1), fmt.Sprintf("R%d", 3*i+2), fmt.Sprintf("R%d", 3*i+3), fmt.Sprintf("U%d", i+1)
}

func pathName(q bool) string {
	if q {
		return "Q"
	}
	return "I"
}

func runAnalog(e *env, args []string) error {
	fs := newFlagSet(e, "analog", analogUsage, analogExamples)
	out := fs.StringP("output", "o", "", "write the report (or JSON) here instead of standard output")
	force := fs.Bool("force", false, "overwrite existing outputs")
	bandS := fs.String("band", "300:2700", "audio band LOW:HIGH in Hz (1 Hz to 10 MHz)")
	sections := fs.Int("sections", 6, fmt.Sprintf("first-order sections of both paths together, 1 to %d", hilbert.MaxSections))
	target := fs.Float64("target", 40, "suppression goal in dB: the yield counts trials reaching it; alone, it picks the fewest sections")
	fix := fs.String("fix", "c", "which part is fixed: c (every section the same capacitor, R computed) or r")
	cS := fs.String("c", "10n", "the fixed capacitor in farads (10n, 4.7nF, 0.01u) with --fix c")
	rS := fs.String("r", "10k", "the fixed resistor in ohms (10k, 4k7) with --fix r")
	seriesS := fs.String("series", "E96", "preferred series the computed part snaps to: "+strings.Join(hilbert.SeriesNames, ", "))
	gainS := fs.String("r-gain", "10k", "the op-amp's equal input and feedback resistors Rin = Rf, ohms")
	rTol := fs.Float64("r-tol", 1, "resistor tolerance in percent (0 to below 50)")
	cTol := fs.Float64("c-tol", 5, "capacitor tolerance in percent (0 to below 50)")
	dist := fs.String("distribution", "uniform", "part values in the Monte Carlo: uniform within ±tol, or gaussian with 3σ = tol")
	trials := fs.Int("trials", 2000, fmt.Sprintf("Monte Carlo trials, 1 to %d", maxTrials))
	seed := fs.Uint64("seed", 1, "Monte Carlo seed (the same seed repeats the run)")
	points := fs.Int("points", 512, "frequencies of the log-spaced band grid, 16 to 4096")
	bom := fs.String("bom", "", "write the parts list as CSV to this file")
	plotTo := fs.String("plot", "", "draw suppression against frequency (ideal, snapped, Monte Carlo spread) to this PNG")
	asJSON := fs.Bool("json", false, "print the report as JSON")
	quiet := fs.BoolP("quiet", "q", false, "no progress bar")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() != 0 {
		return usagef("analog takes no arguments, got %q", fs.Arg(0))
	}
	low, high, err := iq.ParseBand(*bandS)
	if err != nil {
		return usagef("--band: %v", err)
	}
	if !(low > 0) {
		return usagef("--band %s: want 0 < LOW < HIGH", *bandS)
	}
	if low < 1 || high > 10e6 || high/low > hilbert.MaxAnalogRatio {
		return usagef("--band %s: want an audio band from 1 Hz to 10 MHz spanning at most a ratio of %g", *bandS, float64(hilbert.MaxAnalogRatio))
	}
	if fs.Changed("sections") && (*sections < 1 || *sections > hilbert.MaxSections) {
		return usagef("--sections %d: want 1 to %d", *sections, hilbert.MaxSections)
	}
	if math.IsNaN(*target) || math.IsInf(*target, 0) || *target < 0 || *target > hilbert.MaxSuppressionDB {
		return usagef("--target %g dB: want 0 to %d", *target, hilbert.MaxSuppressionDB)
	}
	fixR := false
	switch *fix {
	case "c":
		if fs.Changed("r") {
			return usagef("--r applies to --fix r (with --fix c the capacitor is fixed: --c)")
		}
	case "r":
		fixR = true
		if fs.Changed("c") {
			return usagef("--c applies to --fix c (with --fix r the resistor is fixed: --r)")
		}
	default:
		return usagef("--fix %q: want c or r", *fix)
	}
	cVal, err := parsePartIn("--c", *cS, "F", 1e-12, 1)
	if err != nil {
		return err
	}
	rVal, err := parsePartIn("--r", *rS, "Ω", 1, 1e9)
	if err != nil {
		return err
	}
	gain, err := parsePartIn("--r-gain", *gainS, "Ω", 1, 1e9)
	if err != nil {
		return err
	}
	series, err := hilbert.Series(*seriesS)
	if err != nil {
		return usagef("--series: %v", err)
	}
	seriesName := strings.ToUpper(strings.TrimSpace(*seriesS))
	for _, t := range []struct {
		flag string
		v    float64
	}{{"--r-tol", *rTol}, {"--c-tol", *cTol}} {
		if !(t.v >= 0 && t.v < 50) {
			return usagef("%s %g: want a tolerance in percent from 0 to below 50", t.flag, t.v)
		}
	}
	gaussian := false
	switch *dist {
	case "uniform":
	case "gaussian":
		gaussian = true
	default:
		return usagef("--distribution %q: want uniform or gaussian", *dist)
	}
	if *trials < 1 || *trials > maxTrials {
		return usagef("--trials %d: want 1 to %d (the cap keeps a run to seconds)", *trials, maxTrials)
	}
	if *points < 16 || *points > 4096 {
		return usagef("--points %d: want 16 to 4096", *points)
	}
	if err := needFile("--bom", *bom); err != nil {
		return err
	}
	if err := needFile("--plot", *plotTo); err != nil {
		return err
	}
	for _, o := range []string{*out, *bom, *plotTo} {
		if o != "" && o != "-" {
			if err := checkOutput(o, *force); err != nil {
				return err
			}
		}
	}

	n := *sections
	if fs.Changed("target") && !fs.Changed("sections") {
		var ok bool
		if n, ok = hilbert.AnalogSectionsFor(*target, low, high); !ok {
			return usagef("--target %g dB: even %d sections reach only %.1f dB over %s–%s Hz", *target, n,
				hilbert.AnalogSuppressionDB(n, low, high), fmtHz(low), fmtHz(high))
		}
	}
	design, err := hilbert.NewAnalog(n, low, high)
	if err != nil {
		return usagef("%v", err)
	}
	parts := hilbert.Parts{FixR: fixR, Value: cVal, Gain: gain}
	if fixR {
		parts.Value = rVal
	}
	ideal := design.Build(parts)
	parts.Series = series
	snapped := design.Build(parts)
	for _, s := range snapped.Sections {
		if s.R < 1e3 || s.R > 1e6 {
			e.warnf("a section needs R = %s: outside 1 kΩ to 1 MΩ the op-amp's load and input currents matter (choose another --c or --r)", fmtSI(s.R, "Ω", 3))
			break
		}
	}

	tol := hilbert.Tolerance{R: *rTol / 100, C: *cTol / 100, Gaussian: gaussian}
	bar := newProgressCount(e, *quiet || *trials*n*(*points) < 50e6, "analog", int64(*trials))
	mc := snapped.MonteCarlo(hilbert.MonteCarlo{Low: low, High: high, Points: *points, Trials: *trials, Seed: *seed, Tol: tol,
		Curves: *plotTo != "", Progress: func(int) { bar.Add(1) }})
	bar.Done()
	sens := snapped.Sensitivity(low, high, *points, tol)

	ia := ideal.Analyze(low, high)
	sa := snapped.Analyze(low, high)
	rep := analogReport{
		BandHz: [2]float64{low, high}, Sections: n, Fix: *fix, Series: seriesName, FixedValue: parts.Value, GainOhm: gain,
		IdealMinDB: round(ia.SuppressionMinDB, 2), IdealMeanDB: round(ia.SuppressionMeanDB, 2),
		SnappedMinDB: round(sa.SuppressionMinDB, 2), SnappedMeanDB: round(sa.SuppressionMeanDB, 2),
		DelayMS: round(sa.DelayMS, 4), TargetDB: *target,
		MonteCarlo: analogMC{Trials: *trials, Seed: *seed, Distribution: *dist, RTolPct: *rTol, CTolPct: *cTol, Points: *points,
			Quantile: "empirical (gonum stat.Empirical: smallest trial value with at least the fraction p of trials at or below it)",
			MedianDB: round(mc.Quantile(0.5), 2), P5DB: round(mc.Quantile(0.05), 2), P1DB: round(mc.Quantile(0.01), 2),
			Yield: round(mc.Yield(*target), 4)},
		ModelCaveat: "ideal op-amps; op-amp choice, layout and matching between the paths matter beyond this model",
	}
	for i, s := range snapped.Sections {
		id := ideal.Sections[i]
		r, c, rin, rf, u := refs(i)
		rep.Parts = append(rep.Parts, analogPart{
			Section: i + 1, Path: pathName(s.Q), PoleHz: round(id.Pole(), 3),
			RIdealOhm: sig(id.R, 6), CIdealF: sig(id.C, 6), ROhm: sig(s.R, 6), CF: sig(s.C, 6),
			PoleSnappedHz: round(s.Pole(), 3), RRef: r, CRef: c, RinRef: rin, RfRef: rf, OpAmpRef: u,
		})
	}
	for _, s := range sens {
		r, c, rin, rf, _ := refs(s.Section)
		ref := map[string]string{"R": r, "C": c, "Rin": rin, "Rf": rf}[s.Part]
		role := map[string]string{"R": "sets the pole", "C": "sets the pole", "Rin": "gain (input)", "Rf": "gain (feedback)"}[s.Part]
		rep.Sensitivity = append(rep.Sensitivity, analogSensitivity{Part: ref, Section: s.Section + 1, Path: pathName(snapped.Sections[s.Section].Q),
			Role: role, TolerancePct: 100 * s.Tolerance, DropDB: round(s.DropDB, 2), SlopeDBPerPct: round(s.SlopeDBPerPct, 3)})
	}
	sort.SliceStable(rep.Sensitivity, func(i, j int) bool { return rep.Sensitivity[i].DropDB > rep.Sensitivity[j].DropDB })

	if *bom != "" {
		if err := writeOutputTo(e, *bom, *force, func(w io.Writer) error { return writeBOM(w, rep, snapped, tol) }); err != nil {
			return err
		}
	}
	if *plotTo != "" {
		title := fmt.Sprintf("Analog network, %d sections, %s–%s Hz: ideal %.1f dB, %s %.1f dB; Monte Carlo band minimum: median %.1f dB", n,
			fmtHz(low), fmtHz(high), rep.IdealMinDB, seriesName, rep.SnappedMinDB, rep.MonteCarlo.MedianDB)
		err := writeOutputTo(e, *plotTo, *force, func(w io.Writer) error {
			return writeAnalogPNG(w, title, mc, ideal.SuppressionCurve(mc.Freq), snapped.SuppressionCurve(mc.Freq), seriesName, *target)
		})
		if err != nil {
			return err
		}
	}
	return writeOutputTo(e, *out, *force, func(w io.Writer) error {
		if *asJSON {
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(rep)
		}
		return writeAnalogText(w, rep)
	})
}

// parsePartIn is parsePart with the value bounded to [lo, hi], the parts
// a builder can buy (1 pF to 1 F, 1 Ω to 1 GΩ).
func parsePartIn(flag, s, unit string, lo, hi float64) (float64, error) {
	v, err := parsePart(flag, s, unit)
	if err == nil && !(v >= lo && v <= hi) {
		return 0, usagef("%s %q: want %s to %s", flag, s, fmtSI(lo, unit, 3), fmtSI(hi, unit, 3))
	}
	return v, err
}

// parsePart parses a part value with an optional SI prefix (p, n, u or µ,
// m, k, M, G) and unit, as builders write them: 10n, 4.7 nF, 4k7, 22kΩ,
// 1M (spaces ignored). The prefix may stand for the decimal point
// (4k7 = 4.7k).
func parsePart(flag, s, unit string) (float64, error) {
	bad := func() (float64, error) {
		return 0, usagef("%s %q: want a positive value like 10n, 4.7nF, 4k7 or 22k", flag, s)
	}
	t := strings.ReplaceAll(s, " ", "")
	for _, u := range []string{unit, "ohm", "ohms", "R", "F"} {
		if u != "" && strings.HasSuffix(t, u) && len(t) > len(u) {
			t = strings.TrimSuffix(t, u)
			break
		}
	}
	prefixes := []struct {
		p string
		m float64
	}{{"p", 1e-12}, {"n", 1e-9}, {"u", 1e-6}, {"µ", 1e-6}, {"μ", 1e-6}, {"m", 1e-3}, {"k", 1e3}, {"K", 1e3}, {"M", 1e6}, {"G", 1e9}}
	mul := 1.0
	for _, pm := range prefixes {
		p, m := pm.p, pm.m
		if i := strings.Index(t, p); i > 0 {
			rest := t[i+len(p):]
			if rest != "" && strings.ContainsAny(rest, ".eE") {
				return bad()
			}
			t = t[:i]
			if rest != "" {
				t += "." + rest
			}
			mul = m
			break
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || strings.ContainsAny(t, "xXpP_") || !(v > 0) || math.IsInf(v*mul, 0) {
		return bad()
	}
	return v * mul, nil
}

// fmtSI formats v with an SI prefix and d significant figures, trailing
// zeros dropped: 174000 Ω → "174 kΩ", 4.7e-9 F → "4.7 nF".
func fmtSI(v float64, unit string, d int) string {
	r := sig(v, d)
	p := siPrefixes[len(siPrefixes)-1]
	for _, q := range siPrefixes {
		if r >= math.Pow(10, float64(q.e)) {
			p = q
			break
		}
	}
	m := sig(r/math.Pow(10, float64(p.e)), d)
	return strconv.FormatFloat(m, 'f', -1, 64) + " " + p.p + unit
}

var siPrefixes = []struct {
	p string
	e int
}{{"G", 9}, {"M", 6}, {"k", 3}, {"", 0}, {"m", -3}, {"µ", -6}, {"n", -9}, {"p", -12}}

// sig rounds v to d significant figures.
func sig(v float64, d int) float64 {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return v
	}
	e := math.Floor(math.Log10(math.Abs(v)))
	s := math.Pow(10, float64(d-1)-e)
	return math.Round(v*s) / s
}

func writeAnalogText(w io.Writer, r analogReport) error {
	var nq int
	for _, p := range r.Parts {
		if p.Path == "Q" {
			nq++
		}
	}
	fixed := fmt.Sprintf("C fixed at %s, R snapped to %s", fmtSI(r.FixedValue, "F", 3), r.Series)
	if r.Fix == "r" {
		fixed = fmt.Sprintf("R fixed at %s, C snapped to %s", fmtSI(r.FixedValue, "Ω", 3), r.Series)
	}
	fmt.Fprintf(w, "Analog 90° network: %d sections (I %d, Q %d) for %s–%s Hz; %s\n", r.Sections, r.Sections-nq, nq,
		fmtHz(r.BandHz[0]), fmtHz(r.BandHz[1]), fixed)
	fmt.Fprintf(w, "opposite-sideband suppression, minimum over the band: ideal parts %.2f dB, %s values %.2f dB (delay %.3f ms)\n\n",
		r.IdealMinDB, r.Series, r.SnappedMinDB, r.DelayMS)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "section\tpath\tpole Hz\tR ideal\tC ideal\tR\tC\tpole Hz (%s)\tparts\n", r.Series)
	for _, p := range r.Parts {
		fmt.Fprintf(tw, "%d\t%s\t%.2f\t%s\t%s\t%s\t%s\t%.2f\t%s %s, %s = %s = %s, %s\n", p.Section, p.Path, p.PoleHz,
			fmtSI(p.RIdealOhm, "Ω", 4), fmtSI(p.CIdealF, "F", 4), fmtSI(p.ROhm, "Ω", 3), fmtSI(p.CF, "F", 3), p.PoleSnappedHz,
			p.RRef, p.CRef, p.RinRef, p.RfRef, fmtSI(r.GainOhm, "Ω", 3), p.OpAmpRef)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	m := r.MonteCarlo
	fmt.Fprintf(w, "\nMonte Carlo: %d trials (seed %d), R ±%g %%, C ±%g %%, %s", m.Trials, m.Seed, m.RTolPct, m.CTolPct, m.Distribution)
	if m.Distribution == "gaussian" {
		fmt.Fprint(w, " (tolerance = 3σ)")
	}
	fmt.Fprintf(w, "; %d frequencies, log-spaced\n", m.Points)
	fmt.Fprintf(w, "  minimum suppression over the band: median %.2f dB, 5th percentile %.2f dB, 1st percentile %.2f dB\n", m.MedianDB, m.P5DB, m.P1DB)
	fmt.Fprintf(w, "  yield for %g dB: %.1f %% of trials\n", r.TargetDB, 100*m.Yield)
	fmt.Fprintf(w, "\nParts that matter most (fall of the minimum with that part alone at its tolerance limit):\n")
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	line := func(s analogSensitivity) {
		fmt.Fprintf(tw, "  %s\t%s path, section %d, %s\t±%g %%\t%.2f dB\t(%.3f dB per %%, small changes)\n", s.Part, s.Path, s.Section, s.Role, s.TolerancePct, s.DropDB, s.SlopeDBPerPct)
	}
	const shown = 6
	resistorShown := false
	for i, s := range r.Sensitivity {
		if i == shown {
			break
		}
		line(s)
		resistorShown = resistorShown || strings.HasPrefix(s.Part, "R")
	}
	// The worst resistor too, when capacitors fill the list.
	for _, s := range r.Sensitivity {
		if !resistorShown && strings.HasPrefix(s.Part, "R") {
			line(s)
			break
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintf(w, "\nModel: %s.\n", r.ModelCaveat)
	return nil
}

// writeBOM writes the parts list: one row per distinct part, with the
// quantity and the designators, then the op-amps.
func writeBOM(w io.Writer, r analogReport, n *hilbert.Network, tol hilbert.Tolerance) error {
	type key struct {
		kind  string
		value float64
	}
	var order []key
	refsOf := map[key][]string{}
	add := func(k key, ref string) {
		if _, ok := refsOf[k]; !ok {
			order = append(order, k)
		}
		refsOf[k] = append(refsOf[k], ref)
	}
	for i, s := range n.Sections {
		rr, cr, rin, rf, _ := refs(i)
		add(key{"resistor", sig(s.R, 6)}, rr)
		add(key{"capacitor", sig(s.C, 6)}, cr)
		add(key{"resistor", sig(s.Rin, 6)}, rin)
		add(key{"resistor", sig(s.Rf, 6)}, rf)
	}
	sort.SliceStable(order, func(i, j int) bool {
		if order[i].kind != order[j].kind {
			return order[i].kind == "capacitor"
		}
		return order[i].value < order[j].value
	})
	cw := csv.NewWriter(w)
	cw.Write([]string{"item", "quantity", "references", "part", "value", "unit", "value_si", "tolerance_pct", "series", "note"})
	item := 0
	for _, k := range order {
		item++
		unit, t, note := "ohm", tol.R, ""
		if k.kind == "capacitor" {
			unit, t = "F", tol.C
			note = "stable dielectric (C0G/NP0 or film), one value for every section"
		} else if k.value == sig(r.GainOhm, 6) {
			note = "Rin and Rf of each op-amp; their ratio sets the section's gain"
		}
		series := r.Series
		if (k.kind == "capacitor") != (r.Fix == "r") || k.value == sig(r.GainOhm, 6) && k.kind == "resistor" {
			series = "" // the fixed part and the gain resistors are not snapped
		}
		sym := "Ω"
		if unit == "F" {
			sym = "F"
		}
		cw.Write([]string{strconv.Itoa(item), strconv.Itoa(len(refsOf[k])), strings.Join(refsOf[k], " "), k.kind,
			strconv.FormatFloat(k.value, 'g', -1, 64), unit, fmtSI(k.value, sym, 3), strconv.FormatFloat(100*t, 'g', -1, 64), series, note})
	}
	var us []string
	for i := range n.Sections {
		_, _, _, _, u := refs(i)
		us = append(us, u)
	}
	cw.Write([]string{strconv.Itoa(item + 1), strconv.Itoa(len(us)), strings.Join(us, " "), "op-amp", "", "", "", "", "",
		"one per section, unity-gain stable, gain-bandwidth well above the highest pole"})
	cw.Flush()
	return cw.Error()
}
