package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/pflag"

	"ssbkit/iq"
)

// newFlagSet returns a flag set for one subcommand with the flags every
// command shares. usage is the synopsis line(s); examples is shown after the
// flag list.
func newFlagSet(e *env, name, usage, examples string) *pflag.FlagSet {
	fs := pflag.NewFlagSet(name, pflag.ContinueOnError)
	// pflag would print its own usage and errors there; parseFlags
	// reports them as one line instead, and Usage writes to stdout.
	fs.SetOutput(io.Discard)
	fs.SortFlags = false
	fs.Usage = func() {
		w := e.stdout
		fmt.Fprintf(w, "Usage:\n  %s\n\nFlags:\n", strings.TrimSpace(usage))
		// pflag spells boolean flags "--json[=true|false]"; users type --json.
		fmt.Fprint(w, strings.ReplaceAll(fs.FlagUsages(), "[=true|false]", "             "))
		if examples != "" {
			fmt.Fprintf(w, "\n%s\n", strings.TrimRight(examples, "\n"))
		}
	}
	return fs
}

// parseFlags parses args, mapping pflag's errors to usage errors. Help
// returns errHelp after printing.
func parseFlags(fs *pflag.FlagSet, args []string) error {
	// pflag calls Usage itself on -h and on errors; silence it during
	// Parse so help is printed once, to stdout, and errors stay one line.
	usage := fs.Usage
	fs.Usage = func() {}
	err := fs.Parse(args)
	fs.Usage = usage
	if err == pflag.ErrHelp {
		usage()
		return errHelp
	}
	if err != nil {
		return usagef("%v", err)
	}
	return nil
}

// The sample rates ssbkit accepts, from a flag or a file. Receiver audio
// at 8 kHz is the slowest capture it is for, and amateur receivers
// sample at up to some tens of MS/s (common practice); a rate outside
// these bounds is a wrong flag or a damaged header, and taken at its word
// it would ask for filters and transforms of absurd size.
const (
	minRate = 1e3   // Hz
	maxRate = 500e6 // Hz
)

// rateRange is the accepted range, for messages.
const rateRange = "from 1 kHz to 500 MHz"

// parseRate parses the value s of flag (with its dashes) as a sample
// rate; errors are usage errors naming the flag.
func parseRate(flag, s string) (float64, error) {
	r, err := iq.ParseFrequency(s)
	if err != nil {
		return 0, usagef("%s: %v", flag, err)
	}
	if !(r >= minRate && r <= maxRate) {
		return 0, usagef("%s %s: want a sample rate %s", flag, s, rateRange)
	}
	return r, nil
}
