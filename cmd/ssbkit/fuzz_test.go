package main

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

// FuzzParseRateBand: --rate and --band of sweep and splitter, and
// parseRate of every command. An accepted rate lies in [minRate,
// maxRate] and an accepted band in (0, rate/2); a refusal is a usage
// error of one line naming the flag.
func FuzzParseRateBand(f *testing.F) {
	for _, s := range [][2]string{{"8000", "300:2700"}, {"48k", "200:3000"}, {"1e300", "1:2"}, {"NaN", "0:1"}, {"500M", "1k:249.99M"}, {"999.9999", "1:2"}, {"-8k", "2700:300"}} {
		f.Add(s[0], s[1])
	}
	f.Fuzz(func(t *testing.T, rateS, bandS string) {
		r, err := parseRate("--rate", rateS)
		checkUsage(t, err, "--rate")
		if err == nil && !(r >= minRate && r <= maxRate) {
			t.Fatalf("parseRate(%q) = %g", rateS, r)
		}
		rate, lo, hi, err := parseRateBand(rateS, bandS)
		if err != nil {
			if !strings.Contains(err.Error(), "--rate") && !strings.Contains(err.Error(), "--band") {
				t.Fatalf("error %q names neither flag", err)
			}
			checkUsage(t, err, "")
			return
		}
		if !(rate >= minRate && rate <= maxRate && lo > 0 && lo < hi && hi < rate/2) || math.IsInf(hi, 0) {
			t.Fatalf("parseRateBand(%q, %q) = %g, %g, %g", rateS, bandS, rate, lo, hi)
		}
	})
}

// FuzzParseDesigns: sweep's --designs gives known designs only, each once.
func FuzzParseDesigns(f *testing.F) {
	for _, s := range []string{"kaiser,equiripple,allpass", "all", " all ", "fft,fft", "rect,,hamming", "weaver", "Kaiser"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := parseDesigns(s)
		checkUsage(t, err, "--designs")
		if err != nil {
			return
		}
		if len(d) == 0 {
			t.Fatalf("%q: no designs", s)
		}
		seen := map[string]bool{}
		for _, x := range d {
			if !slices.Contains(sweepDesigns(), x) || seen[x] {
				t.Fatalf("%q: design %q unknown or repeated in %q", s, x, d)
			}
			seen[x] = true
		}
	})
}

// checkUsage fails unless err is nil or a one-line usage error holding
// flag.
func checkUsage(t *testing.T, err error, flag string) {
	t.Helper()
	if err == nil {
		return
	}
	var u *usageError
	if !errors.As(err, &u) || strings.ContainsAny(err.Error(), "\n\r") || !strings.Contains(err.Error(), flag) {
		t.Fatalf("error %q: want a one-line usage error naming %s", err, flag)
	}
}
