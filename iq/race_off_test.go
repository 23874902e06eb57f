//go:build !race

package iq

const raceEnabled = false
