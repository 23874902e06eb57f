/*
Ssbkit makes, decodes and measures single-sideband (SSB) and AM I/Q
recordings, offline.

Usage:

	ssbkit COMMAND [ARGUMENTS] [FLAGS]

The commands are:

	tx        audio or test tones to SSB/AM/DSB I/Q (test transmissions)
	rx        decode SSB/AM stations from a capture to WAV audio
	measure   modulation quality of one SSB/AM transmission
	sweep     opposite-sideband suppression against phase-splitter length
	splitter  one phase-splitter design in detail, coefficients, plot
	analog    analog RC phasing network: parts, tolerances, parts list
	spectrum  averaged spectrum and waterfall; detect signals
	info      format, level, DC, clipping and I/Q balance of a capture
	convert   convert a capture between sample formats
	demo      build the demo scenario and run every job on it

"ssbkit COMMAND --help" prints a command's flags and examples. The
contract for names, units and JSON keys is the project's DESIGN.md; the
README gives an example of each command.

Conventions shared by every command: frequencies and rates accept k, M
and G suffixes; errors are one line on stderr, "ssbkit: COMMAND: why",
with exit status 1 for a failure and 2 for a usage error; outputs are
written to a temporary file beside the target and renamed on success, so
a failed or interrupted run leaves no partial file, an existing file is
replaced only with --force, and an output equal to an input is refused;
a progress bar is drawn only when stderr is a terminal.

The command is a thin layer: main calls run(args, env), which each test
calls with buffers in place of the standard streams; each subcommand has
its own pflag.FlagSet in a file of its name.
*/
package main
