package datasets

import "math"

// Mu0 is the magnetic constant in H/m.
const Mu0 = 4e-7 * math.Pi

// Conductivities at 20 °C in S/m, CRC Handbook of Chemistry and Physics
// (electrical resistivity of pure metals): silver 63.0, copper 59.6, gold
// 45.2, aluminium 37.7, iron 10.0, lead 4.8 MS/m. The alloys are typical
// values, approximate and from memory: brass about 16, bronze about 7,
// sterling silver about 50, carat gold alloys 5-16, can-end aluminium alloy
// about 20, mild steel about 6 MS/m.
var Conductivity = map[string]float64{
	"silver":    63.0e6,
	"copper":    59.6e6,
	"gold":      45.2e6,
	"aluminium": 37.7e6,
	"iron":      10.0e6,
	"lead":      4.8e6,
	"brass":     16e6,
	"bronze":    7e6,
	"sterling":  50e6,
	"steel":     6e6,
}

// RelativePermeability is a typical low-field μr: 1 for the non-magnetic
// metals; iron and mild steel are given a typical bulk value (approximate,
// from memory: the effective μr of a small object is lowered by its shape).
var RelativePermeability = map[string]float64{
	"iron":  150,
	"steel": 100,
}

// SkinDepth is sqrt(2/(ω μ σ)), in metres.
func SkinDepth(w, mur, sigma float64) float64 { return math.Sqrt(2 / (w * Mu0 * mur * sigma)) }
