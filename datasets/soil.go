package datasets

import "math"

// ViscousSoil is the susceptibility of a magnetically viscous soil with
// relaxation times spread log-uniformly far beyond the band (Lee, "The effect
// of magnetic viscosity on transient electromagnetic measurements",
// Geophysics 49, 1984; the frequency-domain form used in UXO work):
//
//	χ(ω) = χ0 - D·[ln(ωτ2) + iπ/2]
//
// so the in-phase part falls by D·ln 10 a decade and the quadrature is the
// constant Dπ/2: their ratio is (π/2)/ln 10 = 0.682.
func ViscousSoil(w, chi0, D, tau2 float64) complex128 {
	return complex(chi0-D*math.Log(w*tau2), -D*math.Pi/2)
}

// SalineGround is a conducting half-space at low induction number, seen by a
// coil at height h: quadrature only, growing with frequency, as
// -i·ωμ0σh²/4 (the low-induction-number limit; McNeill, "Electromagnetic
// terrain conductivity measurement at low induction numbers", Geonics
// TN-6, 1980, gives the same linear law in ωσ). Returned in the units of
// ViscousSoil, for the same coupling factor.
func SalineGround(w, sigma, h float64) complex128 {
	return complex(0, -w*Mu0*sigma*h*h/4)
}
