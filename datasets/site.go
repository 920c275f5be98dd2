package datasets

import "math"

// Site is a place of our own invention: what lies in its ground, and its soil.
type Site struct {
	Name   string
	Prefix string             // dig id prefix
	Mix    map[string]float64 // class -> share of what gets dug
	// Soil is the ground's susceptibility-equivalent response.
	Soil func(w float64) complex128
	// GroundLogged is the share of digs with a bare-ground reading logged.
	GroundLogged float64
}

// Sites of the demo. Invented places; any likeness to a real one is chance.
var Sites = []Site{
	{
		Name: "Harrowmere Farm", Prefix: "HF",
		// An iron-rich inland plough field: strong magnetic viscosity, and a
		// long history of iron.
		Mix: map[string]float64{
			"iron/nail": 0.22, "iron/fragment": 0.20, "steel/cap": 0.08, "aluminium/foil": 0.07,
			"aluminium/ring-pull": 0.05, "copper/coin": 0.06, "bronze/coin": 0.06, "silver/coin": 0.04,
			"gold/ring": 0.015, "silver/ring": 0.015, "brass/button": 0.06, "lead/shot": 0.09,
			"steel/ordnance": 0.015,
		},
		Soil:         func(w float64) complex128 { return ViscousSoil(w, 2.5e-3, 6e-5, 1e-6) },
		GroundLogged: 0.7,
	},
	{
		Name: "Sandle Reach", Prefix: "SR",
		// A tidal beach: wet saline sand with a little magnetic black sand,
		// and a holiday crowd's losses and litter.
		Mix: map[string]float64{
			"iron/nail": 0.04, "iron/fragment": 0.05, "steel/cap": 0.12, "aluminium/foil": 0.16,
			"aluminium/ring-pull": 0.18, "copper/coin": 0.16, "bronze/coin": 0.02, "silver/coin": 0.02,
			"gold/ring": 0.07, "silver/ring": 0.06, "brass/button": 0.03, "lead/shot": 0.04,
			"steel/ordnance": 0.01,
		},
		Soil: func(w float64) complex128 {
			return SalineGround(w, 4, 0.03) + ViscousSoil(w, 3e-4, 1e-5, 1e-6)
		},
		GroundLogged: 0.9,
	},
}

// SiteNamed finds a site; nil if none.
func SiteNamed(name string) *Site {
	for i := range Sites {
		if Sites[i].Name == name {
			return &Sites[i]
		}
	}
	return nil
}

// DisplayID is the demo detector's single number: an invented, monotone map
// of the phase in degrees at one frequency onto about 0-99,
//
//	id = round(50 + 49·tanh((φ - 120°)/45°))
//
// It copies no instrument's scale.
func DisplayID(phaseDeg float64) float64 {
	return math.Round(50 + 49*math.Tanh((phaseDeg-120)/45))
}
