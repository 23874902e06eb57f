package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCmd runs the command line with captured streams.
func runCmd(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var o, e bytes.Buffer
	code = run(args, &env{stdin: strings.NewReader(""), stdout: &o, stderr: &e})
	return code, o.String(), e.String()
}

func TestDispatch(t *testing.T) {
	tests := []struct {
		args []string
		code int
		out  string // substring of stdout
		err  string // substring of stderr
	}{
		{nil, exitUsage, "", "Commands:"},
		{[]string{"--help"}, exitOK, "Commands:", ""},
		{[]string{"--version"}, exitOK, "ssbkit ", ""},
		{[]string{"nosuch"}, exitUsage, "", `ssbkit: unknown command "nosuch"`},
	}
	for _, tt := range tests {
		code, out, errs := runCmd(t, tt.args...)
		if code != tt.code || !strings.Contains(out, tt.out) || !strings.Contains(errs, tt.err) {
			t.Errorf("run(%q) = %d, stdout %q, stderr %q; want %d, %q, %q", tt.args, code, out, errs, tt.code, tt.out, tt.err)
		}
	}
}

// Every command answers --help with exit 0 and a usage text on stdout.
func TestEveryCommandHasHelp(t *testing.T) {
	for _, c := range commands {
		code, out, errs := runCmd(t, c.name, "--help")
		if code != exitOK || !strings.Contains(out, "Usage:") {
			t.Errorf("%s --help = %d, stdout %q, stderr %q; want 0 and a usage text", c.name, code, out, errs)
		}
		code, _, errs = runCmd(t, c.name, "--no-such-flag")
		if code != exitUsage || !strings.HasPrefix(errs, "ssbkit: "+c.name+": ") || strings.Count(errs, "\n") != 1 {
			t.Errorf("%s --no-such-flag = %d, stderr %q; want exit 2 and one line", c.name, code, errs)
		}
	}
}

func TestOutputSafety(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "out.cf32")
	in := filepath.Join(dir, "in.cf32")
	if err := os.WriteFile(in, []byte{0, 0, 0, 0, 0, 0, 0, 0}, 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := createOutput(in, true, in); err == nil {
		t.Error("output equal to input accepted")
	}
	if _, err := createOutput(filepath.Join(dir, ".", "in.cf32"), true, in); err == nil {
		t.Error("output equal to input (other spelling) accepted")
	}

	f, err := createOutput(target, false)
	if err != nil {
		t.Fatal(err)
	}
	f.WriteString("half")
	f.Abort()
	if _, err := os.Stat(target); !os.IsNotExist(err) {
		t.Errorf("aborted output exists: %v", err)
	}
	assertNoTemp(t, dir)

	f, err = createOutput(target, false)
	if err != nil {
		t.Fatal(err)
	}
	f.WriteString("whole")
	if err := f.Commit(); err != nil {
		t.Fatal(err)
	}
	f.Abort() // no-op after Commit
	if b, _ := os.ReadFile(target); string(b) != "whole" {
		t.Errorf("committed output holds %q, want %q", b, "whole")
	}
	if _, err := createOutput(target, false); err == nil || !strings.Contains(err.Error(), "--force") {
		t.Errorf("existing output without --force: err = %v, want a refusal naming --force", err)
	}
	f, err = createOutput(target, true)
	if err != nil {
		t.Fatalf("existing output with --force: %v", err)
	}
	f.Abort()
	if b, _ := os.ReadFile(target); string(b) != "whole" {
		t.Errorf("aborted overwrite changed the existing file to %q", b)
	}
	assertNoTemp(t, dir)
}

func assertNoTemp(t *testing.T, dir string) {
	t.Helper()
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.Contains(e.Name(), ".tmp") {
			t.Errorf("temporary file %s left behind", e.Name())
		}
	}
}

// TestStandardOutputUse: "-" is standard output only where a command
// streams there (tx and convert captures, reports); a PNG, a WAV (its
// header is completed last) or a side output beside the report is refused
// as a usage error before any work, and no file named "-" appears. Also
// tx's samples and --json cannot share standard output.
func TestStandardOutputUse(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir) // where a file named "-" would appear
	in := writeCF32(t, dir, "in.cf32", 4096, 48000, 1e-6, tone{1000, 0.3})
	for _, args := range [][]string{
		{"rx", in, "--rate", "48k", "-o", "-"},
		{"spectrum", in, "--rate", "48k", "-o", "-", "--list"},
		{"measure", in, "--rate", "48k", "--plot", "-"},
		{"sweep", "--designs", "kaiser", "--taps", "31", "--csv", "-"},
		{"sweep", "--designs", "kaiser", "--taps", "31", "--plot", "-"},
		{"splitter", "--coeffs", "-"},
		{"splitter", "--plot", "-"},
		{"tx", "--tone", "1k", "--seconds", "0.01", "-o", "-", "--json"},
	} {
		code, _, errs := runCmd(t, args...)
		if code != exitUsage || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, "standard output") {
			t.Errorf("%q: exit %d, %q; want a one-line usage error about standard output", args, code, errs)
		}
		if _, err := os.Stat(filepath.Join(dir, "-")); err == nil {
			t.Fatalf("%q: wrote a file named -", args)
		}
	}
}

// usageCase is a command line that must be refused as a usage error whose
// message holds want.
type usageCase struct {
	args []string
	want string
}

// checkUsageErrors runs cmd with each case's arguments after common and
// wants exit 2 and exactly one stderr line "ssbkit: CMD: …" holding want.
func checkUsageErrors(t *testing.T, cmd string, common []string, cases []usageCase) {
	t.Helper()
	for _, c := range cases {
		args := append(append([]string{cmd}, common...), c.args...)
		code, _, errs := runCmd(t, args...)
		if code != exitUsage || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") != 1 || !strings.HasPrefix(errs, "ssbkit: "+cmd+": ") {
			t.Errorf("%q = %d, %q; want exit 2 and one line with %q", args, code, errs, c.want)
		}
	}
}
