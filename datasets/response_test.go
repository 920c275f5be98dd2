package datasets

import (
	"errors"
	"math"
	"testing"
)

// TestResponseLimits checks Object.Response at the two limits of a sphere
// that have closed forms: a non-conducting permeable sphere's static
// moment is 4πa³(μr−1)/(μr+2) H (Jackson, Classical Electrodynamics, 3rd
// ed., §5.11), 2(μr−1)/(μr+2) over 2πa³, in phase (0°); a good conductor
// far above its time constant tends to the perfect conductor's −2πa³ H,
// x → −1 and phase → 180°.
func TestResponseLimits(t *testing.T) {
	ferrite := Object{Shape: "sphere", MuR: 4, Diameter: 0.02, Wire: 1, Thickness: 1}
	rows, err := ferrite.Response([]int{1000})
	if err != nil {
		t.Fatal(err)
	}
	if want := 2.0 * 3 / 6; math.Abs(rows[0].X-want) > 1e-6 || math.Abs(rows[0].Phase) > 1e-6 {
		t.Errorf("permeable sphere: x %.6f phase %.6f, want x %.6f phase 0 (tolerance 1e-6)", rows[0].X, rows[0].Phase, want)
	}
	copper := Object{Shape: "sphere", Material: "copper", Diameter: 0.05, Wire: 1, Thickness: 1}
	rows, err = copper.Response([]int{100000})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rows[0].X+1) > 0.05 || rows[0].Phase < 175 {
		t.Errorf("5 cm copper sphere at 100 kHz: x %.3f phase %.1f, want x -1 within 0.05 and phase above 175°", rows[0].X, rows[0].Phase)
	}
	for _, bad := range []Object{
		{Shape: "cube", Material: "gold", Diameter: 0.02, Wire: 0.001, Thickness: 0.001},
		{Shape: "sphere", Material: "unobtainium", Diameter: 0.02, Wire: 0.001, Thickness: 0.001},
		{Shape: "sphere", Diameter: 0.02, Wire: 0.001, Thickness: 0.001},
		{Shape: "ring", Material: "gold", Diameter: 0.02, Wire: 0.03, Thickness: 0.001},
		{Shape: "disc", MuR: 50, Diameter: 0.02, Wire: 0.001, Thickness: 0.001},
	} {
		if _, err := bad.Response([]int{1000}); !errors.Is(err, ErrObject) {
			t.Errorf("%+v: %v, want ErrObject", bad, err)
		}
	}
}
