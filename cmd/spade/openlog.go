package main

import (
	"fmt"
	"io"
	"os"

	"github.com/spade-detect/spade/features"
)

// openLog opens a log by name; "-" is the command's standard input.
func openLog(g *globalOptions, name string) (io.ReadCloser, error) {
	if name == "-" {
		return io.NopCloser(g.stdin), nil
	}
	f, err := os.Open(name)
	if err != nil {
		return nil, fmt.Errorf("cannot read %s: %w", name, features.PathCause(err))
	}
	return f, nil
}
