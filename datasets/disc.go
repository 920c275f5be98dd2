package datasets

import (
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/mathext"
)

// discRings is how many concentric rings stand for a thin disc.
const discRings = 16

// DiscPoles models a thin disc of radius a and thickness t as discRings
// concentric annuli carrying azimuthal eddy currents: a circuit of
// resistances R_k = 2πr_k/(σ·w·t), self-inductances from the rectangular
// cross-section's geometric mean distance g ≈ 0.2235(w + t) (Grover 1946),
//
//	L_k = μ0·r_k·(ln(8r_k/g) - 2)
//
// and mutual inductances of coaxial coplanar circles (Maxwell, A Treatise on
// Electricity and Magnetism, 1873, §701):
//
//	M = μ0·sqrt(ab)·[(2/k - k)·K(k) - (2/k)·E(k)],  k² = 4ab/(a+b)²
//
// Driven by a uniform axial field, the currents (R + iωL)I = -iωμ0H0A give
// the moment AᵀI, a sum of poles: with D = R^(-1/2) and DLD = QΛQᵀ, the time
// constants are the eigenvalues λ_j and the weights μ0(QᵀDA)_j²/λ_j. This is
// a discretised eddy-current model of our own, an approximation; its
// high-frequency limit approaches the perfectly conducting disc's
// -(8/3)a³ (see the tests).
func DiscPoles(a, t, sigma float64) []Pole {
	n := discRings
	w := a / float64(n)
	r := make([]float64, n)
	res := make([]float64, n)
	area := make([]float64, n)
	for k := range n {
		r[k] = (float64(k) + 0.5) * w
		res[k] = 2 * math.Pi * r[k] / (sigma * w * t)
		area[k] = math.Pi * r[k] * r[k]
	}
	g := 0.2235 * (w + t)
	s := mat.NewSymDense(n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			var l float64
			if i == j {
				l = Mu0 * r[i] * (math.Log(8*r[i]/g) - 2)
			} else {
				l = CoaxialMutual(r[i], r[j], 0)
			}
			s.SetSym(i, j, l/math.Sqrt(res[i]*res[j]))
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(s, true) {
		panic("datasets: disc eigen-decomposition failed")
	}
	var q mat.Dense
	eig.VectorsTo(&q)
	lambda := eig.Values(nil)
	poles := make([]Pole, 0, n)
	for j := range n {
		var b float64
		for k := range n {
			b += q.At(k, j) * area[k] / math.Sqrt(res[k])
		}
		if lambda[j] <= 0 || b*b == 0 {
			continue
		}
		poles = append(poles, Pole{Tau: lambda[j], Weight: Mu0 * b * b / lambda[j]})
	}
	return poles
}

// CoaxialMutual is Maxwell's mutual inductance of two coaxial circles of
// radii a and b, d apart, with k² = 4ab/((a+b)² + d²). gonum's CompleteK and
// CompleteE take the parameter m = k².
func CoaxialMutual(a, b, d float64) float64 {
	m := 4 * a * b / ((a+b)*(a+b) + d*d)
	k := math.Sqrt(m)
	return Mu0 * math.Sqrt(a*b) * ((2/k-k)*mathext.CompleteK(m) - (2/k)*mathext.CompleteE(m))
}

// PolesMoment sums poles at angular frequency w.
func PolesMoment(poles []Pole, w float64) complex128 {
	var z complex128
	for _, p := range poles {
		z += p.Eval(w)
	}
	return z
}
