package iq

import "fmt"

// A FormatError reports malformed input: a file that is not what its name
// or the options say it is. Offset is the byte offset of the problem, or
// −1 when it does not apply.
type FormatError struct {
	File   string
	Offset int64
	Msg    string
}

// Error returns "file: byte offset: message", "input" standing for an
// unnamed file and the offset left out when it is negative.
func (e *FormatError) Error() string {
	where := e.File
	if where == "" {
		where = "input"
	}
	if e.Offset >= 0 {
		return fmt.Sprintf("%s: byte %d: %s", where, e.Offset, e.Msg)
	}
	return fmt.Sprintf("%s: %s", where, e.Msg)
}

// An UnsupportedError reports valid input that ssbkit does not handle,
// such as a WAV encoding or a SigMF datatype.
type UnsupportedError struct {
	File string
	What string
}

// Error returns "file: unsupported what".
func (e *UnsupportedError) Error() string {
	if e.File == "" {
		return "unsupported " + e.What
	}
	return e.File + ": unsupported " + e.What
}

func formatErr(file string, off int64, format string, a ...any) error {
	return &FormatError{File: file, Offset: off, Msg: fmt.Sprintf(format, a...)}
}
