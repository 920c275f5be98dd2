package datasets

import "math"

// RingInductance is the self-inductance of a thin circular ring of radius R
// made of round wire of radius r, in henries, for a uniform current
// (Grover, Inductance Calculations, 1946, ch. 13):
//
//	L = μ0·R·(ln(8R/r) - 7/4)
func RingInductance(R, r float64) float64 { return Mu0 * R * (math.Log(8*R/r) - 1.75) }

// RingResistance is the DC resistance of the ring, 2πR/(σπr²) = 2R/(σr²).
func RingResistance(R, r, sigma float64) float64 { return 2 * R / (sigma * r * r) }

// Pole is one relaxation of a target's response: the moment per unit field
// contributes -Weight·iωτ/(1+iωτ), in m³.
type Pole struct {
	Tau    float64 // seconds
	Weight float64 // m³
}

// Eval is the pole's moment at angular frequency w.
func (p Pole) Eval(w float64) complex128 {
	iwt := complex(0, w*p.Tau)
	return complex(-p.Weight, 0) * iwt / (1 + iwt)
}

// RingPole is the thin ring as a coupled circuit (Grant & West 1965): the EMF
// -iωμ0AH0 drives the current I = -iωμ0AH0/(R + iωL), so the moment AI is one
// pole with τ = L/R and weight μ0A²/L, A = πR².
func RingPole(R, r, sigma float64) Pole {
	L := RingInductance(R, r)
	A := math.Pi * R * R
	return Pole{Tau: L / RingResistance(R, r, sigma), Weight: Mu0 * A * A / L}
}
