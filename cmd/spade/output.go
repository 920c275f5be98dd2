package main

import (
	"bufio"
	"io"
	"os"
	"path/filepath"

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

// checkOutputs refuses, before any work, an output that names one of the
// inputs: the same file by device and inode when the output exists, or
// the same cleaned absolute path when it does not yet ("./digs.csv" and
// "dir/../digs.csv" are digs.csv). Nothing the user owns is overwritten.
// "-" and empty names are standard streams or unset, and never clash.
func checkOutputs(outputs map[string]string, inputs ...string) error {
	for flag, out := range outputs {
		if out == "" || out == "-" {
			continue
		}
		oi, oerr := os.Stat(out)
		oabs, _ := filepath.Abs(out)
		for _, in := range inputs {
			if in == "" || in == "-" {
				continue
			}
			same := false
			if ii, err := os.Stat(in); err == nil && oerr == nil {
				same = os.SameFile(oi, ii)
			} else if iabs, err := filepath.Abs(in); err == nil {
				same = iabs == oabs
			}
			if same {
				return usagef("%s %s names the input %s: it would be overwritten; choose another output file", flag, out, in)
			}
		}
	}
	return nil
}
