// Command ssbkit makes, decodes and measures single-sideband and AM I/Q
// recordings. See doc.go for the manual.
package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"
	"syscall"

	"github.com/spf13/pflag"
)

// version is set at build time with -ldflags "-X main.version=…".
var version = "0.1.0-dev"

// env is what a subcommand sees of the outside world; tests substitute
// buffers for the streams.
type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
	// stderrTTY reports whether stderr is a terminal (progress bars).
	stderrTTY bool
	// cmd is the running subcommand's name, for warnings.
	cmd string
}

// warnf prints a one-line warning, "ssbkit: CMD: warning: …", on stderr;
// the run goes on. Warnings are not silenced by -q.
func (e *env) warnf(format string, a ...any) {
	fmt.Fprintf(e.stderr, "ssbkit: %s: warning: %s\n", e.cmd, fmt.Sprintf(format, a...))
}

// command is one subcommand: its one-line summary and its entry point.
// run receives the arguments after the command name.
type command struct {
	name    string
	summary string
	run     func(e *env, args []string) error
}

// commands lists every subcommand; each lives in a file of its own name.
var commands = []command{
	{"tx", "audio or test tones to SSB/AM/DSB I/Q (test transmissions)", runTx},
	{"rx", "decode SSB/AM stations from a capture to WAV audio", runRx},
	{"measure", "modulation quality of one SSB/AM transmission", runMeasure},
	{"sweep", "opposite-sideband suppression against phase-splitter length", runSweep},
	{"splitter", "one phase-splitter design in detail, coefficients, plot", runSplitter},
	{"analog", "analog RC phasing network: parts, tolerances, parts list", runAnalog},
	{"spectrum", "averaged spectrum and waterfall; detect signals", runSpectrum},
	{"info", "format, level, DC, clipping and I/Q balance of a capture", runInfo},
	{"convert", "convert a capture between sample formats", runConvert},
	{"demo", "build the demo scenario and run every job on it", runDemo},
}

func main() {
	watchSignals()
	e := &env{stdin: os.Stdin, stdout: os.Stdout, stderr: os.Stderr, stderrTTY: isTerminal(os.Stderr)}
	os.Exit(run(os.Args[1:], e))
}

// Exit codes.
const (
	exitOK      = 0
	exitFailure = 1
	exitUsage   = 2
	// exitBrokenPipe is 128 + SIGPIPE, the shell's status for a tool
	// ended by a closed pipe (common practice).
	exitBrokenPipe = 128 + int(syscall.SIGPIPE)
)

// usageError marks an error in the command line itself (exit 2).
type usageError struct{ msg string }

func (u *usageError) Error() string { return u.msg }

func usagef(format string, a ...any) error { return &usageError{fmt.Sprintf(format, a...)} }

// errHelp is returned when help was printed; the exit code is 0.
var errHelp = pflag.ErrHelp

// run executes the command line args and returns the exit code.
func run(args []string, e *env) int {
	if len(args) == 0 {
		printToolHelp(e.stderr)
		return exitUsage
	}
	switch args[0] {
	case "-h", "--help", "help":
		if len(args) > 1 && args[0] == "help" {
			return run([]string{args[1], "--help"}, e)
		}
		printToolHelp(e.stdout)
		return exitOK
	case "--version", "version":
		fmt.Fprintf(e.stdout, "ssbkit %s\n", version)
		return exitOK
	}
	name := args[0]
	for _, c := range commands {
		if c.name != name {
			continue
		}
		e.cmd = name
		setCommand(name)
		err := c.run(e, args[1:])
		return report(e, name, err)
	}
	fmt.Fprintf(e.stderr, "ssbkit: unknown command %q (commands: %s)\n", name, commandNames())
	return exitUsage
}

// report prints err as the one-line message of the design and maps it to
// an exit code.
func report(e *env, name string, err error) int {
	if err == nil || errors.Is(err, errHelp) {
		return exitOK
	}
	if errors.Is(err, syscall.EPIPE) {
		// Standard output was closed early ("… - | head"): end quietly
		// with SIGPIPE's status, as other Unix tools do.
		return exitBrokenPipe
	}
	msg := strings.ReplaceAll(err.Error(), "\n", " ")
	fmt.Fprintf(e.stderr, "ssbkit: %s: %s\n", name, msg)
	var u *usageError
	if errors.As(err, &u) {
		return exitUsage
	}
	return exitFailure
}

func commandNames() string {
	names := make([]string, len(commands))
	for i, c := range commands {
		names[i] = c.name
	}
	sort.Strings(names)
	return strings.Join(names, ", ")
}

func printToolHelp(w io.Writer) {
	fmt.Fprintf(w, `ssbkit makes, decodes and measures single-sideband and AM I/Q recordings.

Usage:
  ssbkit COMMAND [ARGUMENTS] [FLAGS]

Commands:
`)
	for _, c := range commands {
		fmt.Fprintf(w, "  %-9s %s\n", c.name, c.summary)
	}
	fmt.Fprintf(w, `
Run "ssbkit COMMAND --help" for a command's flags and examples.
Start with "ssbkit demo -o demo-out" to see every job on an invented scenario.
`)
}
