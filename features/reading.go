package features

import "math"

// Reading is one frequency's response in components: X is the in-phase
// (reactive) part, positive for a magnetic response; R is the quadrature
// (resistive) part, non-negative for a passive, lossy target.
type Reading struct {
	Hz int
	X  float64
	R  float64
}

// FromPolar builds a Reading from a phase in degrees and an amplitude.
func FromPolar(hz int, phaseDeg, amp float64) Reading {
	s, c := math.Sincos(phaseDeg * math.Pi / 180)
	return Reading{Hz: hz, X: amp * c, R: amp * s}
}

// Phase is atan2(R, X) in degrees, in [-90, 270): a reading a little past
// 180° (noise, ground) stays next to 180° instead of wrapping to -180°.
func (r Reading) Phase() float64 {
	p := math.Atan2(r.R, r.X) * 180 / math.Pi
	if p < -90 {
		p += 360
	}
	return p
}

// Amp is hypot(X, R).
func (r Reading) Amp() float64 { return math.Hypot(r.X, r.R) }

// Rotate turns the reading by -deg degrees of phase: the reading of an
// instrument whose zero sits at deg, brought to spade's convention.
func (r Reading) Rotate(deg float64) Reading {
	if deg == 0 {
		return r
	}
	s, c := math.Sincos(-deg * math.Pi / 180)
	return Reading{Hz: r.Hz, X: r.X*c - r.R*s, R: r.X*s + r.R*c}
}
