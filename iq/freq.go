package iq

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ParseFrequency parses a frequency or rate in hertz with an optional
// decimal multiplier suffix k (10³), M (10⁶) or G (10⁹) and an optional
// "Hz" unit: "1500", "48k", "7.1M", "-300k", "2.4GHz". The lower-case m is
// refused because it would mean milli.
func ParseFrequency(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if len(t) > 2 && strings.EqualFold(t[len(t)-2:], "hz") {
		t = t[:len(t)-2]
	}
	mul := 1.0
	if t != "" {
		switch t[len(t)-1] {
		case 'k', 'K':
			mul = 1e3
		case 'M':
			mul = 1e6
		case 'G', 'g':
			mul = 1e9
		case 'm':
			return 0, fmt.Errorf("frequency %q: use M for mega (m would be milli)", s)
		}
		if mul != 1 {
			t = t[:len(t)-1]
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || t == "" || strings.ContainsAny(t, "xXpP_") {
		return 0, fmt.Errorf("frequency %q: not a number (examples: 1500, 48k, 7.1M)", s)
	}
	v *= mul
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("frequency %q: not finite", s)
	}
	return v, nil
}

// ParseBand parses a band "LOW:HIGH" of two frequencies (each as in
// ParseFrequency) with LOW < HIGH.
func ParseBand(s string) (low, high float64, err error) {
	a, b, ok := strings.Cut(s, ":")
	if !ok {
		return 0, 0, fmt.Errorf("band %q: want LOW:HIGH, e.g. 300:2700", s)
	}
	if low, err = ParseFrequency(a); err != nil {
		return 0, 0, fmt.Errorf("band %q: %w", s, err)
	}
	if high, err = ParseFrequency(b); err != nil {
		return 0, 0, fmt.Errorf("band %q: %w", s, err)
	}
	if !(low < high) {
		return 0, 0, fmt.Errorf("band %q: LOW must be below HIGH", s)
	}
	return low, high, nil
}
