package datasets

import (
	"math"
	"math/cmplx"
)

// SphereX is the normalised response of a conducting, permeable sphere of
// radius a in a uniform alternating field (Wait, "A conducting sphere in a
// time varying magnetic field", Geophysics 16, 1951; Ward & Hohmann,
// "Electromagnetic theory for geophysical applications", 1988):
//
//	X = [2μr(tanh α - α) + (α² tanh α - α + tanh α)] / [μr(tanh α - α) - (α² tanh α - α + tanh α)]
//	α = a·sqrt(iωμ0μrσ)
//
// The induced dipole moment is m = 2πa³·X·H0. At DC X = 2(μr-1)/(μr+2); at
// high frequency X → -1.
//
// Numerics: with g = (tanh α - α)/α³ + 1/3, which is O(α²), the formula
// rearranges to
//
//	X = [2(1-μr)/3 + (2μr+1+α²)·g - α²/3] / [-(μr+2-α²)/3 + (μr-1-α²)·g]
//
// which has no cancelling O(1) terms at small |α|; g is taken from its
// Taylor series there, where tanh α - α itself cancels, and tanh α → 1 is
// used for large |α|.
func SphereX(w, a, sigma, mur float64) complex128 {
	al := complex(a, 0) * cmplx.Sqrt(complex(0, w*Mu0*mur*sigma))
	al2 := al * al
	g := tanhSeriesRest(al)
	m := complex(mur, 0)
	num := complex(2*(1-mur)/3, 0) + (2*m+1+al2)*g - al2/3
	den := -(m+2-al2)/3 + (m-1-al2)*g
	return num / den
}

// tanhSeriesRest is (tanh x - x)/x³ + 1/3, by series below |x| = 0.1 and in
// closed form above. The series is tanh's Taylor series (Abramowitz & Stegun
// 4.5.64) without its first two terms; at |x| = 0.1 its next term is below
// 1e-17.
func tanhSeriesRest(x complex128) complex128 {
	if cmplx.Abs(x) < 0.1 {
		x2 := x * x
		// Coefficients of x^(2k+5) in tanh x, from x⁵ on.
		c := [...]float64{2.0 / 15, -17.0 / 315, 62.0 / 2835, -1382.0 / 155925, 21844.0 / 6081075, -929569.0 / 638512875}
		var s complex128
		for k := len(c) - 1; k >= 0; k-- {
			s = s*x2 + complex(c[k], 0)
		}
		return s * x2
	}
	var t complex128
	if real(x) > 20 {
		t = 1 // tanh to double precision; avoids overflow in cosh
	} else {
		t = cmplx.Tanh(x)
	}
	return (t-x)/(x*x*x) + 1.0/3
}

// SphereMoment is the sphere's dipole moment per unit field, 2πa³·X, in m³.
func SphereMoment(w, a, sigma, mur float64) complex128 {
	return complex(2*math.Pi*a*a*a, 0) * SphereX(w, a, sigma, mur)
}
