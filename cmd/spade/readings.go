package main

import (
	"errors"
	"io"

	"github.com/spade-detect/spade/classify"
	"github.com/spade-detect/spade/features"
)

// readingSource yields the readings one at a time.
func readingSource(g *globalOptions, opts classifyOptions, args []string) (func() (features.Dig, error), string, func(), error) {
	if opts.reading != "" {
		d, err := classify.ParseInline(opts.reading)
		if err != nil {
			return nil, "", nil, usageError{Err: err}
		}
		done := false
		return func() (features.Dig, error) {
			if done {
				return features.Dig{}, io.EOF
			}
			done = true
			return *d, nil
		}, "--reading", func() {}, nil
	}
	name := args[0]
	f, err := openLog(g, name)
	if err != nil {
		return nil, "", nil, err
	}
	ro := opts.log.readOptions()
	// Readings to classify need no unique ids (each result keeps its
	// input's order), so the reader keeps no id set: memory stays constant.
	ro.AllowDuplicateIDs = true
	rd, err := features.NewReader(f, name, ro)
	if err != nil {
		f.Close()
		return nil, "", nil, err
	}
	next := func() (features.Dig, error) {
		d, err := rd.Next()
		if errors.Is(err, io.EOF) {
			g.reportRead(rd.Bad, rd.Ignored(), rd.Notes)
		}
		return d, err
	}
	return next, name, func() { f.Close() }, nil
}
