package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"sync"
	"syscall"
)

// outFile is an output being written: a temporary file in the target folder
// that becomes the target only when Commit is called, so a failed or
// interrupted run leaves no half-written file and never touches an existing
// one.
type outFile struct {
	*os.File
	target string
	done   bool
}

// pending is what an interrupted run must undo: the temporary files it
// is writing, the targets it has already renamed into place and the
// folders it created. A run that ends normally removes its own temporary
// files; a signal ends it with all of these removed.
var pending struct {
	sync.Mutex
	names     map[string]bool // temporary files
	committed []string        // targets written by this run
	dirs      []string        // folders created by this run (removed if empty)
	cmd       string          // the command, for the message
	once      sync.Once
}

// watchSignals makes SIGINT, SIGTERM and SIGPIPE end the process after
// removing everything in pending, with the shell's status for a death
// by that signal, 128 + its number (common practice): 130, 143, 141.
// SIGPIPE (standard output closed early, "ssbkit convert … - | head")
// ends the run silently, as it ends other Unix tools; the others print
// one line.
func watchSignals() {
	pending.once.Do(func() {
		c := make(chan os.Signal, 1)
		signal.Notify(c, os.Interrupt, syscall.SIGTERM, syscall.SIGPIPE)
		go func() {
			s := <-c
			pending.Lock() // held until exit: no file is created or renamed after this
			removePending()
			code := 128 + int(s.(syscall.Signal))
			if s != syscall.SIGPIPE {
				name := "ssbkit"
				if pending.cmd != "" {
					name += ": " + pending.cmd
				}
				fmt.Fprintf(os.Stderr, "%s: interrupted (%s): no output written\n", name, signalName(s))
			}
			os.Exit(code)
		}()
	})
}

// signalName returns SIGINT, SIGTERM, SIGPIPE or the signal's own text.
func signalName(s os.Signal) string {
	switch s {
	case os.Interrupt:
		return "SIGINT"
	case syscall.SIGTERM:
		return "SIGTERM"
	case syscall.SIGPIPE:
		return "SIGPIPE"
	}
	return s.String()
}

// removePending removes the temporary files, the targets already
// written and the folders created (if empty); pending is locked.
func removePending() {
	for n := range pending.names {
		os.Remove(n)
	}
	for _, n := range pending.committed {
		os.Remove(n)
	}
	for i := len(pending.dirs) - 1; i >= 0; i-- {
		os.Remove(pending.dirs[i]) // fails, as wanted, unless empty
	}
}

// setCommand records the running command for the interrupt message; the
// outermost one (demo runs others) is kept.
func setCommand(name string) {
	pending.Lock()
	if pending.cmd == "" {
		pending.cmd = name
	}
	pending.Unlock()
}

// mkdirOutput creates the folder dir (and its parents) for outputs; an
// interrupted run removes the folders it created, once empty.
func mkdirOutput(dir string) error {
	var created []string
	for d := filepath.Clean(dir); ; d = filepath.Dir(d) {
		if _, err := os.Lstat(d); err == nil || d == filepath.Dir(d) {
			break
		}
		created = append(created, d)
	}
	pending.Lock()
	defer pending.Unlock()
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for i := len(created) - 1; i >= 0; i-- {
		pending.dirs = append(pending.dirs, created[i])
	}
	return nil
}

// checkOutput validates that target may be written: it is not one of the
// inputs and, unless force, does not exist yet.
func checkOutput(target string, force bool, inputs ...string) error {
	if target == "" {
		return usagef("no output path given (-o PATH)")
	}
	if target == "-" {
		return nil
	}
	ta, _ := filepath.Abs(target)
	tst, terr := os.Stat(target)
	for _, in := range inputs {
		if in == "" || in == "-" {
			continue
		}
		ia, _ := filepath.Abs(in)
		if ia == ta {
			return usagef("output %s is also an input", target)
		}
		if terr == nil {
			if ist, err := os.Stat(in); err == nil && os.SameFile(ist, tst) {
				return usagef("output %s is also an input", target)
			}
		}
	}
	if terr == nil && !tst.Mode().IsRegular() && !tst.IsDir() {
		// Renaming onto a device or a pipe would replace it, not write to it.
		return fmt.Errorf("%s is not a regular file (a device or a pipe); write to standard output (-o -) and redirect it", target)
	}
	if terr == nil && !force {
		return fmt.Errorf("%s exists (use --force to overwrite)", target)
	}
	if terr == nil && tst.IsDir() {
		return fmt.Errorf("%s is a folder", target)
	}
	return nil
}

// needFile returns a usage error when target is "-": the output of flag
// (a PNG, or a WAV whose header is completed last) needs a file.
func needFile(flag, target string) error {
	if target == "-" {
		return usagef("%s -: this output needs a file name, not standard output", flag)
	}
	return nil
}

// createOutput opens a temporary file beside target. The caller writes to
// it and then calls Commit, or Abort on failure (Abort after Commit is a
// no-op, so `defer f.Abort()` is the usual pattern).
func createOutput(target string, force bool, inputs ...string) (*outFile, error) {
	if target == "-" {
		// callers that can write to standard output do so themselves
		return nil, needFile("output", target)
	}
	if err := checkOutput(target, force, inputs...); err != nil {
		return nil, err
	}
	dir := filepath.Dir(target)
	watchSignals()
	// Created and registered under the lock, so a signal handler that
	// holds it sees every temporary file.
	pending.Lock()
	defer pending.Unlock()
	f, err := os.CreateTemp(dir, "."+filepath.Base(target)+".tmp*")
	if err != nil {
		return nil, fmt.Errorf("cannot write in %s: %w", dir, unwrapPath(err))
	}
	if pending.names == nil {
		pending.names = map[string]bool{}
	}
	pending.names[f.Name()] = true
	return &outFile{File: f, target: target}, nil
}

// Write writes p to the temporary file; an error names no temporary file
// (the caller names the target).
func (o *outFile) Write(p []byte) (int, error) {
	n, err := o.File.Write(p)
	return n, unwrapPath(err)
}

// Commit closes the file and renames it onto the target.
func (o *outFile) Commit() error {
	if o.done {
		return nil
	}
	o.done = true
	if err := o.File.Close(); err != nil {
		o.remove()
		return fmt.Errorf("%s: %w", o.target, unwrapPath(err))
	}
	if err := os.Chmod(o.File.Name(), 0o644); err != nil {
		o.remove()
		return fmt.Errorf("%s: %w", o.target, unwrapPath(err))
	}
	pending.Lock()
	defer pending.Unlock()
	if err := os.Rename(o.File.Name(), o.target); err != nil {
		os.Remove(o.File.Name())
		return fmt.Errorf("%s: %w", o.target, unwrapPath(err))
	}
	delete(pending.names, o.File.Name())
	pending.committed = append(pending.committed, o.target)
	return nil
}

// Abort closes and removes the temporary file.
func (o *outFile) Abort() {
	if o.done {
		return
	}
	o.done = true
	o.File.Close()
	o.remove()
}

// remove removes the temporary file and forgets it.
func (o *outFile) remove() {
	os.Remove(o.File.Name())
	pending.Lock()
	delete(pending.names, o.File.Name())
	pending.Unlock()
}

// stickyWriter keeps the first write error of a report printed with
// fmt.Fprintf, which drops them: checked at the end, it keeps a report
// cut short by a full disk from being committed as if whole.
type stickyWriter struct {
	w   io.Writer
	err error
}

func (s *stickyWriter) Write(p []byte) (int, error) {
	if s.err != nil {
		return 0, s.err
	}
	n, err := s.w.Write(p)
	if err != nil {
		s.err = unwrapPath(err)
	}
	return n, err
}

// unwrapPath drops the *PathError wrapper, whose text repeats the
// temporary name; the caller names the real target.
func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
