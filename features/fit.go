package features

import "math"

// PoleFit is the target model fitted to one reading set:
//
//	z(ω) = m - c·iωτ/(1 + iωτ),   m >= 0, c >= 0, τ > 0
//
// m is the in-phase magnetic (ferrous) part, c the conductive part and τ the
// target's time constant in seconds. A conducting loop of inductance L and
// resistance R coupled to the coil responds as one such pole with τ = L/R
// (the coupled-circuit model; Grant & West, Interpretation Theory in Applied
// Geophysics, 1965, §16); the m term is the static magnetisation of a
// permeable target.
type PoleFit struct {
	Tau      float64 // seconds
	M, C     float64 // in the readings' amplitude unit
	Residual float64 // sqrt(SSE / Σ|z|²), 0 for a perfect fit
}

// FerrousFraction is m / (m + c), 0 for a pure conductor, 1 for pure ferrite.
func (f PoleFit) FerrousFraction() float64 {
	if f.M+f.C == 0 {
		return 0
	}
	return f.M / (f.M + f.C)
}

// Pole evaluates the model at angular frequency w.
func Pole(m, c, tau, w float64) (x, r float64) {
	u := w * tau
	d := 1 + u*u
	return m - c*u*u/d, c * u / d
}

// FitPole fits the model by variable projection (Golub & Pereyra, "The
// differentiation of pseudo-inverses and nonlinear least squares problems
// whose variables separate", SIAM J. Numer. Anal. 10, 1973): for each trial τ
// the best (m, c) is a two-parameter non-negative linear least-squares
// problem solved in closed form, leaving a one-dimensional search over log τ.
// The search brackets τ from 0.01/ω_max to 100/ω_min on a grid of four points
// a decade, then refines the best grid point with Brent's method.
//
// It needs at least two frequencies; with one it returns ok == false.
func FitPole(rs []Reading) (fit PoleFit, ok bool) {
	if len(rs) < 2 {
		return PoleFit{}, false
	}
	wmin, wmax := math.Inf(1), 0.0
	var yy float64
	for _, r := range rs {
		w := 2 * math.Pi * float64(r.Hz)
		wmin, wmax = math.Min(wmin, w), math.Max(wmax, w)
		yy += r.X*r.X + r.R*r.R
	}
	if yy == 0 {
		return PoleFit{Tau: 1 / math.Sqrt(wmin*wmax)}, true
	}
	lo, hi := math.Log10(0.01/wmax), math.Log10(100/wmin)
	steps := int(math.Ceil((hi-lo)*4)) + 1
	sse := func(lt float64) float64 {
		s, _, _ := projectPole(rs, math.Pow(10, lt), yy)
		return s
	}
	best, bestSSE := 0, math.Inf(1)
	grid := make([]float64, 0, 32)
	for i := range steps {
		lt := lo + (hi-lo)*float64(i)/float64(steps-1)
		s := sse(lt)
		grid = append(grid, lt)
		if s < bestSSE {
			best, bestSSE = i, s
		}
	}
	a, b := grid[max(best-1, 0)], grid[min(best+1, steps-1)]
	lt, s := brentMin(sse, a, b, grid[best], bestSSE, 1e-7)
	if s > bestSSE {
		lt = grid[best]
	}
	tau := math.Pow(10, lt)
	s, m, c := projectPole(rs, tau, yy)
	return PoleFit{Tau: tau, M: m, C: c, Residual: math.Sqrt(math.Max(s, 0) / yy)}, true
}

// projectPole solves for the best non-negative (m, c) at one τ and returns
// the sum of squared residuals. The basis vectors over (X_j, R_j) are
// e = (1, 0) for m and v = (-u²/(1+u²), u/(1+u²)) for c, with u = ωτ.
func projectPole(rs []Reading, tau, yy float64) (sse, m, c float64) {
	var ee, ev, vv, ey, vy float64
	for _, r := range rs {
		u := 2 * math.Pi * float64(r.Hz) * tau
		d := 1 / (1 + u*u)
		vx, vr := -u*u*d, u*d
		ee++
		ev += vx
		vv += vx*vx + vr*vr
		ey += r.X
		vy += vx*r.X + vr*r.R
	}
	eval := func(m, c float64) float64 {
		return yy - 2*(m*ey+c*vy) + m*m*ee + 2*m*c*ev + c*c*vv
	}
	det := ee*vv - ev*ev
	if det > 1e-300*ee*vv {
		m = (vv*ey - ev*vy) / det
		c = (ee*vy - ev*ey) / det
		if m >= 0 && c >= 0 {
			return eval(m, c), m, c
		}
	}
	// The unconstrained optimum breaks a sign constraint, so the constrained
	// one lies on an edge: one coefficient zero, the other clamped at 0.
	m1 := math.Max(ey/ee, 0)
	c2 := 0.0
	if vv > 0 {
		c2 = math.Max(vy/vv, 0)
	}
	s1, s2 := eval(m1, 0), eval(0, c2)
	if s1 <= s2 {
		return s1, m1, 0
	}
	return s2, 0, c2
}

// brentMin finds a local minimum of f in [a, b], starting from x with f(x) =
// fx, by Brent's method: golden-section steps with parabolic interpolation
// (R. P. Brent, Algorithms for Minimization without Derivatives, 1973, ch. 5).
func brentMin(f func(float64) float64, a, b, x, fx, tol float64) (float64, float64) {
	const cgold = 0.3819660112501051 // (3 - sqrt 5) / 2
	w, v, fw, fv := x, x, fx, fx
	var d, e float64
	for range 100 {
		xm := 0.5 * (a + b)
		tol1 := tol*math.Abs(x) + 1e-12
		tol2 := 2 * tol1
		if math.Abs(x-xm) <= tol2-0.5*(b-a) {
			break
		}
		parabolic := false
		if math.Abs(e) > tol1 {
			r := (x - w) * (fx - fv)
			q := (x - v) * (fx - fw)
			p := (x-v)*q - (x-w)*r
			q = 2 * (q - r)
			if q > 0 {
				p = -p
			}
			q = math.Abs(q)
			if math.Abs(p) < math.Abs(0.5*q*e) && p > q*(a-x) && p < q*(b-x) {
				e, d = d, p/q
				u := x + d
				if u-a < tol2 || b-u < tol2 {
					d = math.Copysign(tol1, xm-x)
				}
				parabolic = true
			}
		}
		if !parabolic {
			if x >= xm {
				e = a - x
			} else {
				e = b - x
			}
			d = cgold * e
		}
		u := x + d
		if math.Abs(d) < tol1 {
			u = x + math.Copysign(tol1, d)
		}
		fu := f(u)
		if fu <= fx {
			if u >= x {
				a = x
			} else {
				b = x
			}
			v, fv, w, fw, x, fx = w, fw, x, fx, u, fu
		} else {
			if u < x {
				a = u
			} else {
				b = u
			}
			if fu <= fw || w == x {
				v, fv, w, fw = w, fw, u, fu
			} else if fu <= fv || v == x || v == w {
				v, fv = u, fu
			}
		}
	}
	return x, fx
}
