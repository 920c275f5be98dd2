package datasets_test

import (
	"fmt"
	"math"

	"github.com/spade-detect/spade/datasets"
)

func ExampleSphereX() {
	// A permeable, non-conducting sphere reads its DC value 2(μr-1)/(μr+2)
	// at every frequency (Wait 1951). A good conductor tends to -1: for
	// large α, X ≈ -1 + 3δ/(2a)·(1 - i), and copper at 1 MHz has a skin
	// depth δ = 65 µm, so a 1 cm sphere reads -1 + 0.0098.
	fmt.Printf("%.4f\n", real(datasets.SphereX(2*math.Pi*1e4, 0.01, 0, 4)))
	x := datasets.SphereX(2*math.Pi*1e6, 0.01, datasets.Conductivity["copper"], 1)
	fmt.Printf("%.3f\n", real(x))
	// Output:
	// 1.0000
	// -0.990
}

func ExampleRingPole() {
	// A gold-alloy ring, 18 mm across, of 2.5 mm wire at 8 MS/m: its time
	// constant L/R and its phase at 10 kHz (90° + atan ωτ).
	p := datasets.RingPole(0.009, 0.00125, 8e6)
	fmt.Printf("tau %.1f us, phase at 10 kHz %.1f°\n", p.Tau*1e6, 90+math.Atan(2*math.Pi*1e4*p.Tau)*180/math.Pi)
	// Output:
	// tau 18.1 us, phase at 10 kHz 138.7°
}
