package main

import (
	"io"
	"time"

	"github.com/schollz/progressbar/v3"
)

// progress reports long work on a terminal; it is silent (and nil-safe)
// when stderr is not a terminal or the user asked for quiet.
type progress struct {
	bar *progressbar.ProgressBar
}

// newProgress returns a bar counting total units (samples, say) with the
// unit name shown in the rate, e.g. "S". total < 0 means unknown.
func newProgress(e *env, quiet bool, desc string, total int64) *progress {
	if quiet || !e.stderrTTY {
		return &progress{}
	}
	bar := progressbar.NewOptions64(total,
		progressbar.OptionSetWriter(e.stderr),
		progressbar.OptionSetDescription(desc),
		progressbar.OptionShowCount(),
		progressbar.OptionShowIts(),
		progressbar.OptionSetItsString("S"),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionSetWidth(30),
	)
	return &progress{bar: bar}
}

// Add advances the bar by n units.
func (p *progress) Add(n int) {
	if p != nil && p.bar != nil {
		p.bar.Add64(int64(n))
	}
}

// Done clears the bar.
func (p *progress) Done() {
	if p != nil && p.bar != nil {
		p.bar.Finish()
		p.bar = nil
	}
}

var _ io.Writer = discard{}
