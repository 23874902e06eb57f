package main

import (
	"fmt"
	"time"

	"github.com/schollz/progressbar/v3"
)

// progress reports long work on a terminal: percent, throughput in MS/s
// and time left. It is silent (and nil-safe) when stderr is not a terminal
// or the user asked for quiet.
type progress struct {
	bar   *progressbar.ProgressBar
	desc  string
	start time.Time
	last  time.Time
	n     int64
	rate  bool // show MS/s (the units are samples)
}

// newProgress returns a bar counting total samples; total < 0 means
// unknown.
func newProgress(e *env, quiet bool, desc string, total int64) *progress {
	if quiet || !e.stderrTTY {
		return &progress{}
	}
	bar := progressbar.NewOptions64(total,
		progressbar.OptionSetWriter(e.stderr),
		progressbar.OptionSetDescription(desc),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionSetWidth(30),
	)
	now := time.Now()
	return &progress{bar: bar, desc: desc, start: now, last: now, rate: true}
}

// newProgressCount returns a bar counting total items that are not samples
// (designs of a sweep, say): percent and time left, no MS/s.
func newProgressCount(e *env, quiet bool, desc string, total int64) *progress {
	p := newProgress(e, quiet, desc, total)
	p.rate = false
	return p
}

// Add advances the bar by n samples.
func (p *progress) Add(n int) {
	if p == nil || p.bar == nil {
		return
	}
	p.n += int64(n)
	if now := time.Now(); p.rate && now.Sub(p.last) >= 250*time.Millisecond {
		p.last = now
		rate := float64(p.n) / now.Sub(p.start).Seconds() / 1e6
		p.bar.Describe(fmt.Sprintf("%s %6.1f MS/s", p.desc, rate))
	}
	p.bar.Add64(int64(n))
}

// Done clears the bar.
func (p *progress) Done() {
	if p != nil && p.bar != nil {
		p.bar.Finish()
		p.bar = nil
	}
}
