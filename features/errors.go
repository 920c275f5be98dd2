package features

import (
	"errors"
	"fmt"
	"io/fs"
)

// Sentinel causes of a ParseError; test them with errors.Is.
var (
	ErrSyntax        = errors.New("malformed")
	ErrNoDigs        = errors.New("no digs")
	ErrHeader        = errors.New("bad header")
	ErrMissingColumn = errors.New("missing column")
	ErrFieldCount    = errors.New("wrong number of fields")
	ErrNotNumber     = errors.New("not a number")
	ErrNotFinite     = errors.New("must be finite")
	ErrNotPositive   = errors.New("must be > 0")
	ErrNegative      = errors.New("must be >= 0")
	ErrMissingValue  = errors.New("missing value")
	ErrFreqSet       = errors.New("frequency set differs")
	ErrDuplicateDig  = errors.New("duplicate dig id")
	ErrBadDate       = errors.New("not a date")
	ErrUnlabelled    = errors.New("unlabelled")
	ErrLabelSlash    = errors.New(`"/" inside a label`)
)

// ParseError is a rejected value, row or header, with its position.
// It prints as "log.csv:214: amp_8000: must be > 0, got -0.3".
type ParseError struct {
	File   string
	Line   int    // 1-based; 0 when the error concerns the whole file
	Column string // the column (CSV) or field path (JSON Lines); may be empty
	Err    error  // wraps one of the sentinel causes
}

func (e *ParseError) Error() string {
	pos := e.File
	if e.Line > 0 {
		pos = fmt.Sprintf("%s:%d", e.File, e.Line)
	}
	if e.Column != "" {
		return pos + ": " + e.Column + ": " + e.Err.Error()
	}
	return pos + ": " + e.Err.Error()
}

func (e *ParseError) Unwrap() error { return e.Err }

// cause wraps a sentinel with the offending detail: "must be > 0, got -0.3".
func cause(sentinel error, format string, args ...any) error {
	return fmt.Errorf("%w, "+format, append([]any{sentinel}, args...)...)
}

// PathCause drops the operation and path an *fs.PathError repeats, so that
// a message names its file once: "cannot read model m.spade: no such file
// or directory", and never the temporary file's name.
func PathCause(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// DigError places an error about one dig of a file at the dig's line, as
// a *ParseError (an error that is one already is returned as it is).
func DigError(file string, d *Dig, err error) error {
	var pe *ParseError
	if errors.As(err, &pe) {
		return err
	}
	return &ParseError{File: file, Line: d.Line, Err: err}
}
