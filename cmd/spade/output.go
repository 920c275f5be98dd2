package main

import (
	"bufio"
	"io"

	"github.com/spade-detect/spade/features"
)

// writeOutput sends output to standard output for "-" and otherwise to a
// file written atomically, so that an interrupted run leaves no half file.
func (g *globalOptions) writeOutput(name string, write func(io.Writer) error) error {
	if name == "-" || name == "" {
		bw := bufio.NewWriter(g.stdout)
		if err := write(bw); err != nil {
			return err
		}
		return bw.Flush()
	}
	return features.WriteFileAtomic(name, func(w io.Writer) error {
		bw := bufio.NewWriter(w)
		if err := write(bw); err != nil {
			return err
		}
		return bw.Flush()
	})
}
