//go:build race

package iq

// raceEnabled: the race detector adds allocations of its own, so the
// zero-allocation checks are skipped under -race.
const raceEnabled = true
