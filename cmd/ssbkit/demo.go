package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"ssbkit/iq"
	"ssbkit/modem"
	"ssbkit/samples"
)

const demoUsage = `ssbkit demo [-o DIR] [--force] [-q]`

const demoExamples = `The demo builds an invented scenario — an evening on a 40 m-like band
around 7.150 MHz with SSB, AM and carrier signals, and a bench test of a
transmitter sending two tones with a known opposite sideband, carrier
leak, intermodulation and receiver I/Q imbalance — and then runs the
other commands on it exactly as a user would: info, spectrum, rx on every
detected station, measure, sweep and tx. DIR/summary.md links every file
with the key figures beside the scenario's truth. All stations and
signals are invented.

Examples:
  ssbkit demo                       # into ./demo-out
  ssbkit demo -o /tmp/demo --force  # again, replacing the earlier files
  ssbkit demo -q -o out             # no progress lines`

// Demo file names inside DIR.
const (
	demoBand       = "band.sigmf-meta"
	demoBench      = "bench.sigmf-meta"
	demoTruth      = "truth.json"
	demoInfo       = "band-info.json"
	demoSpectrum   = "band-spectrum.png"
	demoSignals    = "band-signals.json"
	demoMeasure    = "bench-measure.json"
	demoMeasurePNG = "bench-measure.png"
	demoSweep      = "sweep.json"
	demoSweepPNG   = "sweep.png"
	demoTx         = "tx-two-tone.sigmf-meta"
	demoTxMeasure  = "tx-two-tone-measure.json"
	demoSummary    = "summary.md"
)

// demoTruth is the scenario's known content, written to truth.json.
type demoTruthFile struct {
	Note  string             `json:"note"`
	Band  samples.BandTruth  `json:"band"`
	Bench samples.BenchTruth `json:"bench"`
}

// demoStep is one command the demo ran, for the summary.
type demoStep struct {
	name    string
	args    []string
	err     string // empty on success
	elapsed time.Duration
	stdout  []byte
}

type demo struct {
	e       *env
	dir     string
	force   bool
	quiet   bool
	steps   []*demoStep
	total   int
	started time.Time
}

func runDemo(e *env, args []string) error {
	fs := newFlagSet(e, "demo", demoUsage, demoExamples)
	out := fs.StringP("output", "o", "demo-out", "folder for the demo's files (created if missing)")
	force := fs.Bool("force", false, "replace the files of an earlier demo in the folder")
	quiet := fs.BoolP("quiet", "q", false, "no progress lines")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if fs.NArg() > 0 {
		return usagef("unexpected argument %q (the demo takes only flags)", fs.Arg(0))
	}
	if *out == "" {
		return usagef("-o: empty folder name")
	}
	if st, err := os.Stat(*out); err == nil && !st.IsDir() {
		return fmt.Errorf("%s is not a folder", *out)
	}
	if err := mkdirOutput(*out); err != nil {
		return fmt.Errorf("cannot create %s: %w", *out, unwrapPath(err))
	}
	d := &demo{e: e, dir: *out, force: *force, quiet: *quiet, total: 9, started: time.Now()}
	return d.run()
}

// path returns the name of a demo file inside DIR.
func (d *demo) path(name string) string { return filepath.Join(d.dir, name) }

// say prints one progress line on a terminal.
func (d *demo) say(format string, a ...any) {
	if d.quiet || !d.e.stderrTTY {
		return
	}
	fmt.Fprintf(d.e.stderr, format+"\n", a...)
}

// cmd runs one ssbkit command through run, as a user would, with its
// standard output captured. A failure is recorded and the demo carries on.
func (d *demo) cmd(label string, args ...string) *demoStep {
	if d.force {
		switch args[0] {
		case "spectrum", "rx", "measure", "sweep", "tx":
			args = append(args, "--force")
		}
	}
	var stdout, stderr bytes.Buffer
	sub := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr}
	s := &demoStep{name: label, args: args}
	d.steps = append(d.steps, s)
	d.say("[%d/%d] %s: ssbkit %s", len(d.steps), d.total, label, strings.Join(args, " "))
	t0 := time.Now()
	code := runSub(args, sub)
	s.elapsed = time.Since(t0)
	s.stdout = stdout.Bytes()
	if code != exitOK {
		msg := strings.TrimSpace(stderr.String())
		if i := strings.LastIndex(msg, "\n"); i >= 0 {
			msg = msg[i+1:]
		}
		if msg == "" {
			msg = fmt.Sprintf("exit status %d", code)
		}
		s.err = msg
		d.say("        failed: %s", msg)
	} else {
		d.say("        done in %.1f s", s.elapsed.Seconds())
	}
	return s
}

// save writes data to DIR/name atomically.
func (d *demo) save(name string, data []byte) error {
	f, err := createOutput(d.path(name), d.force)
	if err != nil {
		return err
	}
	defer f.Abort()
	if _, err := f.Write(data); err != nil {
		return fmt.Errorf("%s: %w", d.path(name), unwrapPath(err))
	}
	return f.Commit()
}

// saveStdout keeps a command's standard output as a file when it succeeded.
func (d *demo) saveStdout(s *demoStep, name string) error {
	if s.err != "" || len(s.stdout) == 0 {
		return nil
	}
	return d.save(name, s.stdout)
}

func (d *demo) run() error {
	// 1. The scenario: two captures and their truth.
	d.say("[1/%d] scenario: writing the band and bench-test captures", d.total)
	t0 := time.Now()
	band, err := samples.NewBand(samples.DefaultBandConfig())
	if err != nil {
		return err
	}
	bench, err := samples.NewBench(samples.DefaultBenchConfig())
	if err != nil {
		return err
	}
	truth := demoTruthFile{
		Note:  "Invented demo scenario: no real stations, call signs or places.",
		Band:  band.Truth(),
		Bench: bench.Truth(),
	}
	if err := d.writeCapture(demoBand, band, bandMeta(truth.Band)); err != nil {
		return err
	}
	if err := d.writeCapture(demoBench, bench, benchMeta(truth.Bench, bench.Samples())); err != nil {
		return err
	}
	tj, _ := json.MarshalIndent(truth, "", "  ")
	if err := d.save(demoTruth, append(tj, '\n')); err != nil {
		return err
	}
	d.steps = append(d.steps, &demoStep{name: "scenario", elapsed: time.Since(t0)})
	d.say("        done in %.1f s", time.Since(t0).Seconds())

	band1 := d.path(demoBand)
	bench1 := d.path(demoBench)

	// 2. info
	info := d.cmd("info", "info", band1, "--json")
	if err := d.saveStdout(info, demoInfo); err != nil {
		return err
	}
	// 3. spectrum and detection
	spec := d.cmd("spectrum", "spectrum", band1, "-o", d.path(demoSpectrum), "--json", "-q")
	if err := d.saveStdout(spec, demoSignals); err != nil {
		return err
	}
	signals := parseSignals(spec.stdout)
	// 4. rx on every detected voice signal, one pass
	var rxArgs []string
	for _, s := range signals {
		if s.Kind == "usb" || s.Kind == "lsb" || s.Kind == "am" {
			rxArgs = append(rxArgs, "--offset", fmt.Sprintf("%.0f:%s", math.Round(s.OffsetHz), s.Kind))
		}
	}
	var rx *demoStep
	if len(rxArgs) > 0 {
		args := append([]string{"rx", band1}, rxArgs...)
		rx = d.cmd("rx", append(args, "--fine-tune", "--json", "-o", d.path("station-{freq}.wav"), "-q")...)
	} else {
		rx = &demoStep{name: "rx", args: []string{"rx"}, err: "no signal to decode (spectrum detected none)"}
		d.steps = append(d.steps, rx)
	}
	// 5. measure the bench test
	bt := truth.Bench
	meas := d.cmd("measure", "measure", bench1, "--offset", fmt.Sprintf("%.0f", bt.CarrierOffsetHz),
		"--json", "--plot", d.path(demoMeasurePNG), "-q")
	if err := d.saveStdout(meas, demoMeasure); err != nil {
		return err
	}
	// 6. sweep the phase-splitter designs
	sw := d.cmd("sweep", "sweep", "--taps", "15:255:16", "--sections", "3:12:1", "--json", "--plot", d.path(demoSweepPNG), "-q")
	if err := d.saveStdout(sw, demoSweep); err != nil {
		return err
	}
	// 7. make a test transmission of our own and 8. measure it
	tx := d.cmd("tx", "tx", "--two-tone", "700,1900", "--seconds", "2", "--rate", "48k", "--offset", "3k",
		"--center", "7.090M", "-o", d.path(demoTx), "-q")
	var txm *demoStep
	if tx.err == "" {
		txm = d.cmd("measure tx", "measure", d.path(demoTx), "--offset", "3000", "--json", "-q")
		if err := d.saveStdout(txm, demoTxMeasure); err != nil {
			return err
		}
	} else {
		txm = &demoStep{name: "measure tx", args: []string{"measure", demoTx}, err: "skipped: tx did not run"}
		d.steps = append(d.steps, txm)
	}
	// 9. the summary
	d.say("[%d/%d] summary: %s", d.total, d.total, d.path(demoSummary))
	md := d.summary(truth, info, signals, spec, rx, meas, sw, txm)
	if err := d.save(demoSummary, []byte(md)); err != nil {
		return err
	}
	failed := 0
	for _, s := range d.steps {
		if s.err != "" {
			failed++
		}
	}
	if !d.quiet {
		fmt.Fprintf(d.e.stdout, "demo written to %s in %.1f s: open %s\n", d.dir, time.Since(d.started).Seconds(), d.path(demoSummary))
		if failed > 0 {
			fmt.Fprintf(d.e.stdout, "%d step(s) failed; summary.md says which and why\n", failed)
		}
	}
	return nil
}

// sampleReader is the generators' shape: Read with io.EOF at the end.
type sampleReader interface {
	Read(dst []complex64) (int, error)
	Samples() int64
}

// writeCapture writes a generated capture through createCapture.
func (d *demo) writeCapture(name string, r sampleReader, meta iq.Meta) error {
	c, err := createCapture(d.path(name), meta, d.force)
	if err != nil {
		return err
	}
	defer c.Abort()
	buf := make([]complex64, 16384)
	for {
		n, rerr := r.Read(buf)
		if n > 0 {
			if _, err := c.Write(buf[:n]); err != nil {
				return fmt.Errorf("%s: %w", d.path(name), err)
			}
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return rerr
		}
	}
	return c.Commit()
}

func bandMeta(t samples.BandTruth) iq.Meta {
	m := iq.Meta{Datatype: iq.CI16, Rate: t.RateHz, Center: t.CenterHz, HasCenter: true, Samples: t.Samples,
		Description: "ssbkit demo: an invented evening on a 40 m-like band (no real stations)"}
	for _, s := range t.Stations {
		lo, hi := s.LowHz, s.HighHz
		if lo == hi {
			lo, hi = lo-50, hi+50
		}
		m.Annotations = append(m.Annotations, iq.Annotation{
			FreqLowerEdge: t.CenterHz + lo, FreqUpperEdge: t.CenterHz + hi,
			Label: s.Mode, Comment: s.Label,
		})
	}
	return m
}

func benchMeta(t samples.BenchTruth, n int64) iq.Meta {
	return iq.Meta{Datatype: iq.CF32, Rate: t.RateHz, Center: t.CenterHz, HasCenter: true,
		Samples:     n,
		Description: "ssbkit demo: bench test of a transmitter, two tones, upper sideband",
		Annotations: []iq.Annotation{{
			FreqLowerEdge: t.CenterHz + t.CarrierOffsetHz + t.BandHz[0],
			FreqUpperEdge: t.CenterHz + t.CarrierOffsetHz + t.BandHz[1],
			Label:         "usb", Comment: "two-tone test",
		}}}
}

// detected is one signal of spectrum --json.
type detected = signalJSON

// parseSignals reads spectrum --json: an object with "signals" or a bare
// list.
func parseSignals(b []byte) []detected {
	var obj struct {
		Signals []detected `json:"signals"`
	}
	if json.Unmarshal(b, &obj) == nil && obj.Signals != nil {
		return obj.Signals
	}
	var list []detected
	if json.Unmarshal(b, &list) == nil {
		return list
	}
	return nil
}

// jsonFields decodes a command's JSON object, or nil.
func jsonFields(s *demoStep) map[string]any {
	if s == nil || s.err != "" {
		return nil
	}
	var m map[string]any
	if json.Unmarshal(s.stdout, &m) != nil {
		return nil
	}
	return m
}

// num returns m[key] as a number.
func num(m map[string]any, key string) (float64, bool) {
	v, ok := m[key].(float64)
	return v, ok
}

func fmtNum(m map[string]any, key, format string) string {
	v, ok := num(m, key)
	if !ok {
		return "—"
	}
	return fmt.Sprintf(format, v)
}

// matchStation returns the truth station nearest to a detected carrier.
func matchStation(t samples.BandTruth, off float64) (samples.Station, float64) {
	best, bd := samples.Station{}, math.Inf(1)
	for _, s := range t.Stations {
		// a drifting station is compared with its mid-capture frequency
		mid := s.OffsetHz + s.DriftHz/2
		if d := math.Abs(mid - off); d < bd {
			best, bd = s, d
		}
	}
	return best, bd
}

func (d *demo) summary(truth demoTruthFile, info *demoStep, signals []detected, spec, rx, meas, sw, txm *demoStep) string {
	var b strings.Builder
	w := func(format string, a ...any) { fmt.Fprintf(&b, format, a...) }
	bt := truth.Band
	w("# ssbkit demo\n\n")
	w("An invented scenario (no real stations, call signs or places), built by package `samples` and then\n")
	w("examined with the same commands a user runs. The scenario's known content is in [%s](%s).\n\n", demoTruth, demoTruth)

	w("## Files\n\n| file | what |\n|---|---|\n")
	files := [][2]string{
		{demoBand, fmt.Sprintf("the band capture (SigMF, ci16_le, %.0f kHz, %.0f s, centre %.3f MHz) with `band.sigmf-data`", bt.RateHz/1e3, bt.Seconds, bt.CenterHz/1e6)},
		{demoBench, "the bench-test capture (SigMF, cf32_le) with `bench.sigmf-data`"},
		{demoTruth, "what the scenario contains: stations, levels, injected imperfections"},
		{demoInfo, "`ssbkit info --json` of the band capture"},
		{demoSpectrum, "`ssbkit spectrum`: averaged spectrum and waterfall of the band"},
		{demoSignals, "`ssbkit spectrum --json`: the detected signals"},
		{demoMeasure, "`ssbkit measure --json` of the bench test"},
		{demoMeasurePNG, "`ssbkit measure --plot`: the bench test's spectrum with the figures marked"},
		{demoSweep, "`ssbkit sweep --json`: suppression against splitter length"},
		{demoSweepPNG, "`ssbkit sweep --plot`"},
		{demoTx, "`ssbkit tx --two-tone 700,1900`: a test transmission of our own"},
		{demoTxMeasure, "`ssbkit measure --json` of that transmission"},
	}
	for _, f := range files {
		if _, err := os.Stat(d.path(f[0])); err == nil {
			w("| [%s](%s) | %s |\n", f[0], f[0], f[1])
		} else {
			w("| %s (missing) | %s |\n", f[0], f[1])
		}
	}
	wavs, _ := filepath.Glob(d.path("station-*.wav"))
	sort.Strings(wavs)
	for _, p := range wavs {
		n := filepath.Base(p)
		w("| [%s](%s) | `ssbkit rx`: decoded audio of one station |\n", n, n)
	}

	w("\n## The band capture\n\n")
	if m := jsonFields(info); m != nil {
		w("`ssbkit info`: %s samples, %s s, peak %s dBFS, RMS %s dBFS, image rejection %s dB.\n\n",
			fmtNum(m, "samples", "%.0f"), fmtNum(m, "duration_s", "%.1f"), fmtNum(m, "peak_dbfs", "%.1f"),
			fmtNum(m, "rms_dbfs", "%.1f"), fmtNum(m, "image_rejection_db", "%.1f"))
	}
	if _, err := os.Stat(d.path(demoSpectrum)); err == nil {
		w("![spectrum and waterfall](%s)\n\n", demoSpectrum)
	}

	w("## Signals detected\n\n")
	w("`ssbkit spectrum --json` against the scenario's truth (carrier error: detected minus true, Hz; a drifting\n")
	w("station is compared with its mid-capture carrier). An SSB carrier is first placed 300 Hz outside the steep\n")
	w("edge of the voice spectrum (edge estimate), then found from the voice itself: the harmonics of the\n")
	w("speaker's pitch, tuning confidence 0–1.\n\n")
	w("| # | kind | carrier offset Hz | frequency Hz | SNR dB | true mode | true carrier offset Hz | carrier error Hz | edge estimate error Hz | tuning confidence | station | audio |\n")
	w("|---|---|---|---|---|---|---|---|---|---|---|---|\n")
	var tuned, edged []string
	for i, s := range signals {
		st, _ := matchStation(bt, s.OffsetHz)
		mid := st.OffsetHz + st.DriftHz/2
		audio := "—"
		if s.Kind == "usb" || s.Kind == "lsb" || s.Kind == "am" {
			// rx names the file by the tuned frequency in whole Hz
			name := fmt.Sprintf("station-%.0f.wav", bt.CenterHz+math.Round(s.OffsetHz))
			if _, err := os.Stat(d.path(name)); err == nil {
				audio = fmt.Sprintf("[%s](%s)", name, name)
			}
		}
		edge, conf := "—", "—"
		if s.EdgeHz != nil && s.Confidence != nil {
			edge, conf = fmt.Sprintf("%+.1f", *s.EdgeHz-mid), fmt.Sprintf("%.2f", *s.Confidence)
			tuned = append(tuned, fmt.Sprintf("%+.1f", s.OffsetHz-mid))
			edged = append(edged, fmt.Sprintf("%+.0f", *s.EdgeHz-mid))
		}
		w("| %d | %s | %.0f | %.0f | %.1f | %s | %.0f | %+.1f | %s | %s | %s | %s |\n",
			i+1, s.Kind, s.OffsetHz, bt.CenterHz+s.OffsetHz, s.SNRdB, st.Mode, mid, s.OffsetHz-mid, edge, conf, st.Label, audio)
	}
	if n := len(wavs); n > 0 {
		// the receiver's planner rule (modem.NewReceiverFront)
		how := fmt.Sprintf("each with its own first stage (a channeliser splits the capture once from %d channels on)", modem.ChanneliserMinChannels)
		if n >= modem.ChanneliserMinChannels {
			how = fmt.Sprintf("through one channeliser, a polyphase filter bank that splits the capture once (used from %d channels on)", modem.ChanneliserMinChannels)
		}
		w("\n`ssbkit rx` decoded the %d voice signals in one pass, %s.\n", n, how)
	}
	if len(signals) == 0 {
		w("(no signals: the spectrum step did not run or found none)\n")
	}
	if len(tuned) > 0 {
		w("\nSSB carriers found from the voices are %s Hz from the truth; placed from the spectrum's edges they were %s Hz off.\n",
			strings.Join(tuned, ", "), strings.Join(edged, ", "))
	}
	d.fineTuneSummary(w, bt, rx)
	w("\n## Bench test\n\n")
	bn := truth.Bench
	w("Two tones at %.0f and %.0f Hz, upper sideband, carrier %.0f Hz above the centre; `ssbkit measure --json`\n", bn.Tones[0].OffsetHz, bn.Tones[1].OffsetHz, bn.CarrierOffsetHz)
	w("against what was injected.\n\n")
	w("| figure | measured | injected |\n|---|---|---|\n")
	m := jsonFields(meas)
	rows := []struct {
		key   string
		truth float64
	}{
		{"suppression_db", bn.SuppressionDB},
		{"carrier_dbc", bn.CarrierDBc},
		{"imd3_dbc", bn.IMD3DBc},
		{"imd3_db_pep", bn.IMD3DBPEP},
		{"pep_dbfs", bn.PEPDBFS},
		{"wanted_dbfs", bn.WantedDBFS},
		{"iq_gain_imbalance_db", bn.GainImbalanceDB},
		{"iq_phase_imbalance_deg", bn.PhaseImbalDeg},
		{"image_rejection_db", bn.ImageRejDB},
	}
	for _, r := range rows {
		w("| %s | %s | %.2f |\n", r.key, fmtNum(m, r.key, "%.2f"), r.truth)
	}
	if _, err := os.Stat(d.path(demoMeasurePNG)); err == nil {
		w("\n![bench test](%s)\n", demoMeasurePNG)
	}

	w("\n## Phase splitters\n\n")
	if sm := jsonFields(sw); sm != nil {
		w("`ssbkit sweep`: the shortest design of each kind reaching 60 dB minimum suppression over %s Hz at %s Hz.\n\n",
			bandString(sm["band_hz"]), fmtNum(sm, "rate_hz", "%.0f"))
		w("| design | length | min suppression dB | delay ms | multiply-adds per sample |\n|---|---|---|---|---|\n")
		best := map[string]map[string]any{}
		var order []string
		if rows, ok := sm["rows"].([]any); ok {
			for _, r := range rows {
				row, ok := r.(map[string]any)
				if !ok {
					continue
				}
				name, _ := row["design"].(string)
				s, _ := num(row, "suppression_min_db")
				if s < 60 {
					continue
				}
				if _, seen := best[name]; !seen {
					order = append(order, name)
					best[name] = row
				}
			}
		}
		for _, name := range order {
			row := best[name]
			w("| %s | %s | %s | %s | %s |\n", name, fmtNum(row, "length", "%.0f"), fmtNum(row, "suppression_min_db", "%.1f"),
				fmtNum(row, "delay_ms", "%.2f"), fmtNum(row, "macs_per_sample", "%.1f"))
		}
		w("\n")
	}
	if _, err := os.Stat(d.path(demoSweepPNG)); err == nil {
		w("![suppression against length](%s)\n", demoSweepPNG)
	}

	w("\n## A test transmission of our own\n\n")
	if tm := jsonFields(txm); tm != nil {
		w("`ssbkit tx --two-tone 700,1900` with the default splitter, measured: suppression %s dB, carrier %s dBc, PEP %s dBFS.\n",
			fmtNum(tm, "suppression_db", "%.1f"), fmtNum(tm, "carrier_dbc", "%.1f"), fmtNum(tm, "pep_dbfs", "%.1f"))
	} else {
		w("(not available: see the steps below)\n")
	}

	w("\n## Steps\n\n| step | command | result | seconds |\n|---|---|---|---|\n")
	for _, s := range d.steps {
		res := "ok"
		if s.err != "" {
			res = "FAILED: " + strings.ReplaceAll(s.err, "|", "/")
		}
		args := make([]string, len(s.args))
		for i, a := range s.args {
			args[i] = strings.ReplaceAll(a, d.dir+string(filepath.Separator), "")
		}
		cmd := "`ssbkit " + strings.Join(args, " ") + "`"
		if s.name == "scenario" {
			cmd = "generated with package `samples`"
		}
		w("| %s | %s | %s | %.2f |\n", s.name, cmd, res, s.elapsed.Seconds())
	}
	return b.String()
}

// fineTuneSummary tells, from rx --fine-tune --json, where rx found each
// SSB carrier at the start and at the end of the capture against the
// truth (the drifting station moves by its DriftHz).
func (d *demo) fineTuneSummary(w func(string, ...any), bt samples.BandTruth, rx *demoStep) {
	if rx == nil || rx.err != "" {
		return
	}
	var doc struct {
		Channels []struct {
			OffsetHz float64 `json:"offset_hz"`
			FineTune *struct {
				StartHz float64 `json:"start_hz"`
				EndHz   float64 `json:"end_hz"`
			} `json:"fine_tune"`
		} `json:"channels"`
	}
	if json.Unmarshal(rx.stdout, &doc) != nil {
		return
	}
	var rows []string
	for _, c := range doc.Channels {
		if c.FineTune == nil {
			continue
		}
		st, _ := matchStation(bt, c.OffsetHz)
		a, b := c.OffsetHz+c.FineTune.StartHz, c.OffsetHz+c.FineTune.EndHz
		rows = append(rows, fmt.Sprintf("| %s | %.0f | %.1f → %.1f | %.0f → %.0f | %+.1f, %+.1f |",
			st.Label, c.OffsetHz, a, b, st.OffsetHz, st.OffsetHz+st.DriftHz, a-st.OffsetHz, b-st.OffsetHz-st.DriftHz))
	}
	if len(rows) == 0 {
		return
	}
	w("\n`ssbkit rx --fine-tune` then followed each SSB carrier through the capture from the voice (3 s windows, a\n")
	w("smooth correction applied before the channel filter): the carrier it decoded at the start and at the end.\n\n")
	w("| station | tuned Hz | decoded at Hz (start → end) | true Hz (start → end) | error Hz (start, end) |\n|---|---|---|---|---|\n")
	for _, r := range rows {
		w("%s\n", r)
	}
}

func bandString(v any) string {
	a, ok := v.([]any)
	if !ok || len(a) != 2 {
		return "the band"
	}
	lo, _ := a[0].(float64)
	hi, _ := a[1].(float64)
	return fmt.Sprintf("%.0f–%.0f", lo, hi)
}

// runSub is run, reached through a variable set in init: the command
// table refers to runDemo, so a direct call would be an initialization
// cycle.
var runSub func(args []string, e *env) int

func init() { runSub = run }
