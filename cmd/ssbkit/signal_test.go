//go:build linux

package main

import (
	"bytes"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Write faults and interrupts need the real process: its exit status, its
// signal handling, its file-size limit, its user. The test binary is the
// ssbkit command when re-entered through TestMainProcess.

// TestMainProcess is not a test: run as a child process with
// SSBKIT_MAIN_PROCESS=1, it is ssbkit's main with the arguments after
// "--" (and, with SSBKIT_FSIZE=N, a file-size limit of N bytes, so that
// writes fail with EFBIG as on a full disk).
func TestMainProcess(t *testing.T) {
	if os.Getenv("SSBKIT_MAIN_PROCESS") != "1" {
		return
	}
	if v := os.Getenv("SSBKIT_FSIZE"); v != "" {
		n, _ := strconv.ParseUint(v, 10, 64)
		if err := syscall.Setrlimit(syscall.RLIMIT_FSIZE, &syscall.Rlimit{Cur: n, Max: n}); err != nil {
			os.Exit(99)
		}
	}
	i := slices.Index(os.Args, "--")
	os.Args = append([]string{"ssbkit"}, os.Args[i+1:]...)
	main()
}

// ssbkitProcess returns the command ssbkit args... run by the test binary
// bin in dir.
func ssbkitProcess(bin, dir string, env []string, args ...string) *exec.Cmd {
	cmd := exec.Command(bin, append([]string{"-test.run=^TestMainProcess$", "--"}, args...)...)
	cmd.Dir = dir
	cmd.Env = append(append(os.Environ(), "SSBKIT_MAIN_PROCESS=1"), env...)
	return cmd
}

// exitStatus returns the exit status of a finished command, or -1.
func exitStatus(err error) int {
	if err == nil {
		return 0
	}
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		return ee.ExitCode()
	}
	return -1
}

// listFolder returns the names under dir (recursively), sorted.
func listFolder(t *testing.T, dir string) []string {
	t.Helper()
	var names []string
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err == nil && p != dir {
			r, _ := filepath.Rel(dir, p)
			names = append(names, r)
		}
		return nil
	})
	slices.Sort(names)
	return names
}

// faultCase is one write fault.
type faultCase struct {
	name   string
	args   []string
	fsize  int64  // file-size limit in bytes, 0 for none
	stdout string // "full" for /dev/full, "closed" for a pipe closed after 100 bytes
	exit   int
	msg    string // what the one stderr line must hold; "" for none
}

// TestWriteFaults: a full device on standard output, writes that fail
// part-way (a file-size limit stands in for a full disk: write(2) then
// fails with EFBIG, as it fails with ENOSPC on a full one), and standard
// output closed early. Each ends with one clear line (or, for the closed
// pipe, silently with status 141 = 128 + SIGPIPE, as other Unix tools
// end), no output and no temporary file.
func TestWriteFaults(t *testing.T) {
	if testing.Short() {
		t.Skip("starts child processes")
	}
	if _, err := os.Stat("/dev/full"); err != nil {
		t.Skip("no /dev/full")
	}
	big := cf32Tone(1 << 17) // 1 MiB
	cases := []faultCase{
		{name: "convert to a full device", args: []string{"convert", "x.cf32", "--rate", "48k", "-"}, stdout: "full", exit: 1,
			msg: "ssbkit: convert: standard output: no space left on device"},
		{name: "tx to a full device", args: []string{"tx", "--tone", "1k", "--seconds", "1", "-o", "-"}, stdout: "full", exit: 1,
			msg: "ssbkit: tx: standard output: no space left on device"},
		{name: "tx, disk full part-way", args: []string{"tx", "--tone", "1k", "--seconds", "10", "-o", "out.cf32"}, fsize: 100000, exit: 1,
			msg: "ssbkit: tx: out.cf32: file too large"},
		{name: "convert to SigMF, disk full part-way", args: []string{"convert", "x.cf32", "--rate", "48k", "out.sigmf-meta"}, fsize: 100000, exit: 1,
			msg: "ssbkit: convert: out.sigmf-meta: file too large"},
		{name: "rx with two channels, disk full part-way", args: []string{"rx", "x.cf32", "--rate", "48k", "--offset", "0", "--offset", "5k", "-o", "ch_{freq}.wav"}, fsize: 100000, exit: 1,
			msg: "file too large"},
		{name: "spectrum picture, disk full part-way", args: []string{"spectrum", "x.cf32", "--rate", "48k", "-o", "s.png"}, fsize: 20000, exit: 1,
			msg: "ssbkit: spectrum: s.png: "},
		{name: "measure report and plot, disk full part-way", args: []string{"measure", "x.cf32", "--rate", "48k", "--offset", "-1000", "--plot", "m.png", "-o", "m.txt"}, fsize: 20000, exit: 1,
			msg: "ssbkit: measure: m.png: "},
		{name: "measure report, disk full part-way", args: []string{"measure", "x.cf32", "--rate", "48k", "--offset", "-1000", "-o", "m.txt"}, fsize: 100, exit: 1,
			msg: "ssbkit: measure: m.txt: file too large"},
		{name: "info report, disk full part-way", args: []string{"info", "x.cf32", "--rate", "48k", "-o", "i.txt"}, fsize: 100, exit: 1,
			msg: "ssbkit: info: i.txt: file too large"},
		{name: "sweep table, disk full part-way", args: []string{"sweep", "--designs", "kaiser", "--taps", "31,63", "-o", "s.txt"}, fsize: 100, exit: 1,
			msg: "ssbkit: sweep: s.txt: file too large"},
		{name: "splitter coefficients, disk full part-way", args: []string{"splitter", "--export", "c", "-o", "s.h"}, fsize: 100, exit: 1,
			msg: "ssbkit: splitter: s.h: file too large"},
		{name: "convert, standard output closed early", args: []string{"convert", "x.cf32", "--rate", "48k", "-"}, stdout: "closed", exit: 141},
		{name: "tx, standard output closed early", args: []string{"tx", "--tone", "1k", "--seconds", "60", "-o", "-"}, stdout: "closed", exit: 141},
	}
	for _, c := range cases {
		t.Run(strings.ReplaceAll(c.name, " ", "_"), func(t *testing.T) {
			dir := t.TempDir()
			if err := os.WriteFile(filepath.Join(dir, "x.cf32"), big, 0o644); err != nil {
				t.Fatal(err)
			}
			var env []string
			if c.fsize > 0 {
				env = append(env, "SSBKIT_FSIZE="+strconv.FormatInt(c.fsize, 10))
			}
			cmd := ssbkitProcess(os.Args[0], dir, env, c.args...)
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			var err error
			switch c.stdout {
			case "full":
				f, ferr := os.OpenFile("/dev/full", os.O_WRONLY, 0)
				if ferr != nil {
					t.Skip(ferr)
				}
				defer f.Close()
				cmd.Stdout = f
				err = cmd.Run()
			case "closed":
				out, perr := cmd.StdoutPipe()
				if perr != nil {
					t.Fatal(perr)
				}
				if err := cmd.Start(); err != nil {
					t.Fatal(err)
				}
				// "| head -c 100"
				if _, err := io.ReadFull(out, make([]byte, 100)); err != nil {
					t.Fatal(err)
				}
				out.Close()
				err = cmd.Wait()
			default:
				err = cmd.Run()
			}
			if got := exitStatus(err); got != c.exit {
				t.Errorf("exit %d (%v), want %d; stderr %q", got, err, c.exit, stderr.String())
			}
			msg := stderr.String()
			switch {
			case c.msg == "" && msg != "":
				t.Errorf("stderr %q, want nothing", msg)
			case c.msg != "" && (!strings.Contains(msg, c.msg) || strings.Count(msg, "\n") != 1 || strings.Contains(msg, ".tmp")):
				t.Errorf("stderr %q, want one line holding %q and no temporary name", msg, c.msg)
			}
			if got := listFolder(t, dir); !slices.Equal(got, []string{"x.cf32"}) {
				t.Errorf("folder holds %q, want only the input", got)
			}
		})
	}
}

// TestUnwritableAndUnreadable: a folder without write permission and an
// input without read permission. Permission bits do not stop root, so
// when the tests run as root the command runs as the unprivileged user
// "nobody" (uid 65534), from a copy of the test binary that user may run.
func TestUnwritableAndUnreadable(t *testing.T) {
	if testing.Short() {
		t.Skip("starts child processes")
	}
	bin := os.Args[0]
	var cred *syscall.Credential
	dir := t.TempDir()
	if os.Geteuid() == 0 {
		cred = &syscall.Credential{Uid: 65534, Gid: 65534}
		// t.TempDir's parent and go's build folder are private (0700).
		os.Chmod(filepath.Dir(dir), 0o755)
		os.Chmod(dir, 0o755)
		b, err := os.ReadFile(os.Args[0])
		if err != nil {
			t.Fatal(err)
		}
		bin = filepath.Join(dir, "ssbkit.test")
		if err := os.WriteFile(bin, b, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	ro := filepath.Join(dir, "ro")
	os.Mkdir(ro, 0o755)
	x := filepath.Join(ro, "x.cf32")
	os.WriteFile(x, cf32Tone(4800), 0o644)
	secret := filepath.Join(ro, "secret.cf32")
	os.WriteFile(secret, cf32Tone(4800), 0o000)
	os.Chmod(ro, 0o555)
	defer os.Chmod(ro, 0o755)
	for _, c := range []struct {
		args []string
		msg  string
	}{
		{[]string{"rx", "x.cf32", "--rate", "48k", "-o", "a.wav"}, "ssbkit: rx: cannot write in .: permission denied"},
		{[]string{"convert", "x.cf32", "--rate", "48k", "out.sigmf-meta"}, "ssbkit: convert: cannot write in .: permission denied"},
		{[]string{"tx", "--tone", "1k", "--seconds", "0.1", "-o", "t.cf32"}, "ssbkit: tx: cannot write in .: permission denied"},
		{[]string{"info", "secret.cf32", "--rate", "48k"}, "ssbkit: info: secret.cf32: permission denied"},
	} {
		cmd := ssbkitProcess(bin, ro, nil, c.args...)
		if cred != nil {
			cmd.SysProcAttr = &syscall.SysProcAttr{Credential: cred}
		}
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		err := cmd.Run()
		if code := exitStatus(err); code != 1 || stderr.String() != c.msg+"\n" {
			t.Errorf("%q: exit %d (%v), stderr %q; want 1 and %q", c.args, code, err, stderr.String(), c.msg)
		}
		if got := listFolder(t, ro); !slices.Equal(got, []string{"secret.cf32", "x.cf32"}) {
			t.Errorf("%q: folder holds %q, want only the inputs", c.args, got)
		}
	}
}

// TestInterrupts: SIGINT and SIGTERM in the middle of every command that
// writes leave no target and no temporary file, and end the process with
// status 128 + the signal's number (130, 143: the shell's convention,
// common practice) after one line on stderr. Inputs that are still being
// read come from standard input kept open, so the signal reliably
// arrives mid-run; tx is interrupted once its temporary files appear,
// demo once it has finished its first file (which must go too).
func TestInterrupts(t *testing.T) {
	if testing.Short() {
		t.Skip("starts child processes")
	}
	const waitFor = 20 * time.Second
	type interruptCase struct {
		name  string
		args  []string
		stdin bool // feed endless cu8 samples on standard input
		// ready reports, from the names in the folder, that the run is
		// far enough along to be interrupted
		ready func(names []string) bool
	}
	temps := func(n int) func([]string) bool {
		return func(names []string) bool {
			k := 0
			for _, s := range names {
				if strings.Contains(s, ".tmp") {
					k++
				}
			}
			return k >= n
		}
	}
	// demo: interrupted once it has finished a file (truth.json or a
	// capture), so that removing what the run wrote is tested too.
	committed := func(names []string) bool {
		for _, s := range names {
			if strings.HasPrefix(s, "demo-out/") && !strings.Contains(s, ".tmp") {
				return true
			}
		}
		return false
	}
	cases := []interruptCase{
		{"tx", []string{"tx", "--tone", "1k", "--seconds", "600", "-o", "out.sigmf-meta"}, false, temps(2)},
		{"rx_three_channels", []string{"rx", "-", "--format", "cu8", "--rate", "240k", "--offset", "10k", "--offset", "-20k:lsb", "--offset", "50k:am", "-o", "ch_{freq}.wav"}, true, temps(3)},
		{"convert", []string{"convert", "-", "--format", "cu8", "--rate", "240k", "out.sigmf-meta"}, true, temps(2)},
		{"spectrum", []string{"spectrum", "-", "--format", "cu8", "--rate", "240k", "-o", "s.png"}, true, temps(0)},
		{"measure_plot", []string{"measure", "-", "--format", "cu8", "--rate", "240k", "--plot", "m.png", "-o", "m.txt"}, true, temps(0)},
		{"demo", []string{"demo", "-o", "demo-out"}, false, committed},
	}
	for _, c := range cases {
		for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
			t.Run(c.name+"_"+signalName(sig), func(t *testing.T) {
				dir := t.TempDir()
				cmd := ssbkitProcess(os.Args[0], dir, nil, c.args...)
				var stderr bytes.Buffer
				cmd.Stderr = &stderr
				var stdin io.WriteCloser
				if c.stdin {
					var err error
					if stdin, err = cmd.StdinPipe(); err != nil {
						t.Fatal(err)
					}
				}
				if err := cmd.Start(); err != nil {
					t.Fatal(err)
				}
				defer cmd.Process.Kill()
				if c.stdin {
					// 4 MiB through a 64 KiB pipe: once written, most of it
					// has been read and the command waits for more.
					block := bytes.Repeat([]byte{100, 160, 90, 170}, 1<<20)
					if _, err := stdin.Write(block); err != nil {
						t.Fatalf("writing the input: %v; stderr %q", err, stderr.String())
					}
				}
				deadline := time.Now().Add(waitFor)
				for !c.ready(listFolder(t, dir)) {
					if time.Now().After(deadline) {
						t.Fatalf("no output under way after %v; stderr %q", waitFor, stderr.String())
					}
					time.Sleep(5 * time.Millisecond)
				}
				if err := cmd.Process.Signal(sig); err != nil {
					t.Fatal(err)
				}
				err := cmd.Wait()
				if stdin != nil {
					stdin.Close()
				}
				if got, want := exitStatus(err), 128+int(sig); got != want {
					t.Errorf("exit %d (%v), want %d; stderr %q", got, err, want, stderr.String())
				}
				want := "ssbkit: " + c.args[0] + ": interrupted (" + signalName(sig) + "): no output written\n"
				if stderr.String() != want {
					t.Errorf("stderr %q, want %q", stderr.String(), want)
				}
				if got := listFolder(t, dir); len(got) > 0 {
					t.Errorf("left behind: %q", got)
				}
			})
		}
	}
}
