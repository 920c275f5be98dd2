package main

import (
	"io"

	"github.com/spade-detect/spade/features"
)

// openLog opens a log by name; "-" is the command's standard input.
func openLog(g *globalOptions, name string) (io.ReadCloser, error) {
	if name == "-" {
		return io.NopCloser(g.stdin), nil
	}
	return features.Open(name)
}
