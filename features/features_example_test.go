package features_test

import (
	"fmt"
	"strings"

	"github.com/spade-detect/spade/features"
)

func ExampleFeatureSpec_Extract() {
	log, err := features.ReadLog(strings.NewReader(
		"dig,material,shape,phase_5000,amp_5000,phase_20000,amp_20000\n"+
			"a1,gold,ring,107.44,0.2997,141.49,0.7825\n"), "example.csv", features.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	spec := features.NewSpec(log.Freqs, log.HasDisplayID)
	v, fit, _ := spec.Extract(&log.Digs[0], nil)
	for i, name := range spec.Names {
		fmt.Printf("%-16s %8.3f\n", name, v[i])
	}
	fmt.Printf("tau %.1f µs\n", fit.Tau*1e6)
	// Output:
	// phase_5000        107.440
	// phase_20000       141.490
	// logamp_20000        0.960
	// phase_slope        56.556
	// log10_tau          -5.000
	// ferrous_fraction    0.000
	// fit_residual        0.000
	// tau 10.0 µs
}

func ExampleReadLog_error() {
	_, err := features.ReadLog(strings.NewReader(
		"dig,phase_8000,amp_8000\n"+
			"a1,151.2,0.84\n"+
			"a2,148.0,-0.3\n"), "log.csv", features.ReadOptions{})
	fmt.Println(err)
	// Output:
	// log.csv:3: amp_8000: must be > 0, got -0.3
}
