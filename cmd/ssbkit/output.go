package main

import (
	"errors"
	"fmt"
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

// pending holds the temporary files to remove on SIGINT/SIGTERM.
var pending struct {
	sync.Mutex
	names map[string]bool
	once  sync.Once
}

func watchSignals() {
	pending.once.Do(func() {
		c := make(chan os.Signal, 1)
		signal.Notify(c, os.Interrupt, syscall.SIGTERM)
		go func() {
			s := <-c
			pending.Lock()
			for n := range pending.names {
				os.Remove(n)
			}
			pending.Unlock()
			fmt.Fprintf(os.Stderr, "ssbkit: interrupted (%v): partial output removed\n", s)
			os.Exit(130)
		}()
	})
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
	f, err := os.CreateTemp(dir, "."+filepath.Base(target)+".tmp*")
	if err != nil {
		return nil, fmt.Errorf("cannot write in %s: %w", dir, unwrapPath(err))
	}
	watchSignals()
	pending.Lock()
	if pending.names == nil {
		pending.names = map[string]bool{}
	}
	pending.names[f.Name()] = true
	pending.Unlock()
	return &outFile{File: f, target: target}, nil
}

// Commit closes the file and renames it onto the target.
func (o *outFile) Commit() error {
	if o.done {
		return nil
	}
	o.done = true
	defer forget(o.File.Name())
	if err := o.File.Close(); err != nil {
		os.Remove(o.File.Name())
		return fmt.Errorf("%s: %w", o.target, unwrapPath(err))
	}
	if err := os.Chmod(o.File.Name(), 0o644); err != nil {
		os.Remove(o.File.Name())
		return err
	}
	if err := os.Rename(o.File.Name(), o.target); err != nil {
		os.Remove(o.File.Name())
		return fmt.Errorf("%s: %w", o.target, unwrapPath(err))
	}
	return nil
}

// Abort closes and removes the temporary file.
func (o *outFile) Abort() {
	if o.done {
		return
	}
	o.done = true
	o.File.Close()
	os.Remove(o.File.Name())
	forget(o.File.Name())
}

func forget(name string) {
	pending.Lock()
	delete(pending.names, name)
	pending.Unlock()
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
