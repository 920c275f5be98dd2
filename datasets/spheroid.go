package datasets

import "math"

// DemagnetisingFactors are the demagnetising factors of a prolate spheroid
// of aspect m = c/a ≥ 1 (c the semi-axis of symmetry), along the axis and
// across it (Osborn, "Demagnetizing factors of the general ellipsoid",
// Phys. Rev. 67, 1945; Stoner, Phil. Mag. 36, 1945):
//
//	N_axial = [m/(2√(m²-1))·ln((m+√(m²-1))/(m-√(m²-1))) - 1] / (m²-1)
//	N_trans = (1 - N_axial)/2
//
// so that N_axial + 2·N_trans = 1, and a sphere (m = 1) has 1/3 on every
// axis. Near m = 1 the closed form cancels; a series in e² = 1 - 1/m²
// (the eccentricity) is used there.
func DemagnetisingFactors(m float64) (axial, trans float64) {
	if m < 1 {
		panic("datasets: spheroid aspect below 1")
	}
	if m < 1.01 {
		// N_axial = (1-e²)/e³·(atanh e - e) = (1-e²)·(1/3 + e²/5 + e⁴/7 + ...).
		e2 := 1 - 1/(m*m)
		s, term := 0.0, 1.0
		for k := range 12 {
			s += term / float64(2*k+3)
			term *= e2
		}
		axial = (1 - e2) * s
	} else {
		q := math.Sqrt(m*m - 1)
		axial = (m/(2*q)*math.Log((m+q)/(m-q)) - 1) / (m*m - 1)
	}
	return axial, (1 - axial) / 2
}

// SpheroidPolarizabilities are the principal magnetic polarizabilities of a
// conducting, permeable prolate spheroid of semi-axes a (across) and c ≥ a
// (along the axis), in m³ per unit field, at angular frequency w.
//
// The two limits are exact. At DC the body is a magnetised ellipsoid
// (Osborn 1945):
//
//	α_i(0) = V·(μr - 1) / (1 + (μr - 1)·N_i),   V = (4/3)π·a²·c
//
// and at high frequency it excludes the field as a perfect conductor, the
// same formula with μr → 0: α_i(∞) = -V/(1 - N_i). Between them the
// response follows Wait's sphere (see SphereX), normalised to run from 0 at
// DC to 1 at high frequency, for a sphere whose radius is the size across
// which the eddy currents of that axis circulate: a for the axial field,
// 2ac/(a+c) for the transverse one. The transition is our approximation
// (spheroidal wave functions give the exact one); at c = a every axis is
// Wait's sphere exactly.
//
// This is the dipole (polarizability tensor) model of buried-munitions
// discrimination (Bell, Barrow & Miller, "Subsurface discrimination using
// electromagnetic induction sensors", IEEE TGRS 39, 2001; Pasion &
// Oldenburg, "A discrimination algorithm for UXO using time domain
// electromagnetics", JEEG 6, 2001; both cited from memory): a body of
// revolution has one polarizability along its axis and one across it.
func SpheroidPolarizabilities(w, a, c, sigma, mur float64) (axial, trans complex128) {
	if c < a {
		panic("datasets: spheroid with c < a")
	}
	na, nt := DemagnetisingFactors(c / a)
	v := 4 * math.Pi / 3 * a * a * c
	axis := func(n, r float64) complex128 {
		dc := v * (mur - 1) / (1 + (mur-1)*n)
		hf := -v / (1 - n)
		return complex(dc, 0) + complex(hf-dc, 0)*sphereTransition(w, r, sigma, mur)
	}
	return axis(na, a), axis(nt, 2*a*c/(a+c))
}

// sphereTransition is Wait's sphere response rescaled to run from 0 at DC to
// 1 at high frequency: (X - X(0))/(X(∞) - X(0)), X(0) = 2(μr-1)/(μr+2),
// X(∞) = -1.
func sphereTransition(w, a, sigma, mur float64) complex128 {
	x0 := 2 * (mur - 1) / (mur + 2)
	return (SphereX(w, a, sigma, mur) - complex(x0, 0)) / complex(-1-x0, 0)
}

// Tilted is the moment that coincident coils above a body of revolution
// see, per unit field, when its axis is tilted by theta from the vertical:
// the vertical primary field meets the tensor diag(axial, trans, trans) in
// the body's frame, and the receiver takes the vertical part of the moment,
// ẑᵀMẑ = axial·cos²θ + trans·sin²θ (Bell, Barrow & Miller 2001).
func Tilted(axial, trans complex128, theta float64) complex128 {
	c2 := math.Cos(theta) * math.Cos(theta)
	return axial*complex(c2, 0) + trans*complex(1-c2, 0)
}
