package main

import (
	"strings"

	"github.com/spade-detect/spade/features"
)

// parseFreqList reads "5000,10k,20000" into hertz.
func parseFreqList(s string) ([]int, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	var out []int
	for _, f := range strings.Split(s, ",") {
		hz, err := features.ParseHz(f)
		if err != nil {
			return nil, usagef("--freqs: %v", err)
		}
		out = append(out, hz)
	}
	return out, nil
}
