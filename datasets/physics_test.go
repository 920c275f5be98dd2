package datasets

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// alphaSq is α² = iωμ0μrσa², for choosing w from a wanted |α|.
func wFor(alpha2, a, sigma, mur float64) float64 { return alpha2 / (Mu0 * mur * sigma * a * a) }

func TestSphereDCLimit(t *testing.T) {
	// Wait (1951); Ward & Hohmann (1988): X(0) = 2(μr - 1)/(μr + 2).
	for _, mur := range []float64{1, 2, 50, 150, 1000} {
		got := SphereX(0, 0.01, 1e7, mur)
		want := 2 * (mur - 1) / (mur + 2)
		if !scalar.EqualWithinAbs(real(got), want, 1e-12) || math.Abs(imag(got)) > 1e-15 {
			t.Errorf("μr=%v: X(0) = %v, want %v", mur, got, want)
		}
		// σ = 0 is the static permeable sphere at any frequency.
		if s := SphereX(1e5, 0.01, 0, mur); cmplx.Abs(s-complex(want, 0)) > 1e-12 {
			t.Errorf("μr=%v, σ=0: X = %v, want %v", mur, s, want)
		}
	}
}

func TestSphereHighFrequencyLimit(t *testing.T) {
	// Wait (1951): X → -1 as ω → ∞, for any μr.
	for _, mur := range []float64{1, 100} {
		got := SphereX(wFor(1e8, 0.01, 1e7, mur), 0.01, 1e7, mur)
		if cmplx.Abs(got-(-1)) > 2e-3*mur {
			t.Errorf("μr=%v: X(∞) = %v, want -1", mur, got)
		}
	}
	// Very large α must not overflow.
	if got := SphereX(1e12, 0.05, 6e7, 1); cmplx.IsNaN(got) || cmplx.Abs(got+1) > 1e-3 {
		t.Errorf("huge α: %v", got)
	}
}

func TestSphereLowFrequencySeries(t *testing.T) {
	// Ward & Hohmann (1988): non-magnetic, small α: X ≈ -α²/15 + 2α⁴/315.
	// Both sides of the series switch-over at |α| = 0.1.
	for _, mag := range []float64{1e-4, 0.01, 0.05, 0.0999, 0.1001, 0.2} {
		a2 := complex(0, mag*mag)
		w := wFor(mag*mag, 0.01, 1e7, 1)
		got := SphereX(w, 0.01, 1e7, 1)
		want := -a2/15 + 2*a2*a2/315
		if rel := cmplx.Abs(got-want) / cmplx.Abs(want); rel > 2*math.Pow(mag, 4)+1e-12 {
			t.Errorf("|α|=%v: X = %v, series %v (rel %v)", mag, got, want, rel)
		}
	}
}

func TestSphereQuadraturePeak(t *testing.T) {
	// The non-magnetic sphere's quadrature peaks near ωμ0σa² ≈ 11.6, where
	// X ≈ -0.366 - 0.355i (issue 3; found here by golden-section search on
	// the exact formula).
	const a, sigma = 0.01, 5e7
	q := func(x float64) float64 { return imag(SphereX(wFor(x, a, sigma, 1), a, sigma, 1)) } // negative
	lo, hi := 1.0, 100.0
	for range 200 {
		m1, m2 := lo+(hi-lo)*0.382, lo+(hi-lo)*0.618
		if q(m1) < q(m2) {
			hi = m2
		} else {
			lo = m1
		}
	}
	peak := (lo + hi) / 2
	x := SphereX(wFor(peak, a, sigma, 1), a, sigma, 1)
	if !scalar.EqualWithinAbs(peak, 11.6, 0.1) {
		t.Errorf("peak at ωμ0σa² = %v, want 11.6", peak)
	}
	if !scalar.EqualWithinAbs(real(x), -0.366, 0.002) || !scalar.EqualWithinAbs(imag(x), -0.355, 0.002) {
		t.Errorf("X at the peak = %v, want -0.366-0.355i", x)
	}
}

func TestSpherePoleExpansion(t *testing.T) {
	// The non-magnetic sphere's exact pole expansion (Wait 1951; Ward &
	// Hohmann 1988): X = -Σ 6/(n²π²)·iωτn/(1+iωτn), τn = μ0σa²/(n²π²).
	const a, sigma = 0.012, 3e7
	tau0 := Mu0 * sigma * a * a
	for _, x := range []float64{0.1, 1, 11.6, 100, 1000} {
		w := x / tau0
		var sum complex128
		const N = 200000
		for n := 1; n <= N; n++ {
			nn := float64(n*n) * math.Pi * math.Pi
			iwt := complex(0, w*tau0/nn)
			sum -= complex(6/nn, 0) * iwt / (1 + iwt)
		}
		// The tail beyond N adds about -6/(π²N) to the real part at high ω.
		got := SphereX(w, a, sigma, 1)
		if cmplx.Abs(sum-got) > 1e-5+6/(math.Pi*math.Pi*N) {
			t.Errorf("ωτ0=%v: closed form %v, poles %v", x, got, sum)
		}
	}
}

func TestSkinDepthHandbook(t *testing.T) {
	// Handbook values: copper 8.4 mm at 60 Hz, 0.65 mm at 10 kHz.
	cu := Conductivity["copper"]
	if d := SkinDepth(2*math.Pi*60, 1, cu); !scalar.EqualWithinAbs(d*1e3, 8.4, 0.1) {
		t.Errorf("copper at 60 Hz: %.2f mm", d*1e3)
	}
	if d := SkinDepth(2*math.Pi*10000, 1, cu); !scalar.EqualWithinAbs(d*1e3, 0.65, 0.01) {
		t.Errorf("copper at 10 kHz: %.3f mm", d*1e3)
	}
}

func TestConductivitiesCRC(t *testing.T) {
	// CRC Handbook of Chemistry and Physics, resistivity of metals at 20 °C,
	// in MS/m; brass typical.
	want := map[string]float64{"silver": 63.0, "copper": 59.6, "gold": 45.2, "aluminium": 37.7, "lead": 4.8, "iron": 10.0, "brass": 16}
	for m, v := range want {
		if !scalar.EqualWithinAbs(Conductivity[m]/1e6, v, 1e-9) {
			t.Errorf("%s: %v MS/m, want %v", m, Conductivity[m]/1e6, v)
		}
	}
}

func TestRingInductanceGMD(t *testing.T) {
	// Maxwell's geometric-mean-distance theorem (Treatise, 1873, §691;
	// Grover 1946, ch. 2): a ring's self-inductance (uniform current) equals
	// the mutual inductance of two coaxial filaments of its radius spaced by
	// the GMD of the wire section, r·e^(-1/4). Grover's thin-ring formula
	// and Maxwell's elliptic-integral mutual agree to O(r²/R²).
	for _, c := range []struct{ R, r float64 }{{0.01, 0.001}, {0.009, 0.0005}, {0.05, 0.002}, {0.1, 0.001}} {
		got := RingInductance(c.R, c.r)
		want := CoaxialMutual(c.R, c.R, c.r*math.Exp(-0.25))
		if !scalar.EqualWithinRel(got, want, 2*(c.r*c.r)/(c.R*c.R)*math.Log(8*c.R/c.r)+1e-4) {
			t.Errorf("R=%v r=%v: Grover %v H, GMD %v H", c.R, c.r, got, want)
		}
	}
	// One value worked by hand: R = 10 mm, r = 1 mm:
	// μ0·0.01·(ln 80 - 1.75) = 3.307e-8 H.
	if got := RingInductance(0.01, 0.001); !scalar.EqualWithinRel(got, 3.307e-8, 1e-3) {
		t.Errorf("L = %v", got)
	}
}

func TestRingPoleMatchesCircuit(t *testing.T) {
	// Coupled-circuit response (Grant & West 1965), solved directly.
	const R, r, sigma = 0.009, 0.001, 8e6
	p := RingPole(R, r, sigma)
	L, res, A := RingInductance(R, r), RingResistance(R, r, sigma), math.Pi*R*R
	for _, w := range []float64{1e3, 6e4, 1e6} {
		I := complex(0, -w*Mu0*A) / complex(res, w*L)
		if d := cmplx.Abs(p.Eval(w) - complex(A, 0)*I); d > 1e-12*cmplx.Abs(p.Eval(w)) {
			t.Errorf("w=%v: pole %v, circuit %v", w, p.Eval(w), complex(A, 0)*I)
		}
	}
}

func TestDiscPerfectConductorLimit(t *testing.T) {
	// A perfectly conducting thin disc in an axial field has the moment
	// -(8/3)a³·H0 (Bethe, "Theory of diffraction by small holes", Phys. Rev.
	// 66, 1944, the disc by Babinet's principle; value recalled from
	// memory). The ring model's high-frequency limit -Σ weights must come
	// within 3 % (it lands within 0.5 % at 16 rings).
	for _, a := range []float64{0.005, 0.0125} {
		var sum float64
		for _, p := range DiscPoles(a, a/100, 5e7) {
			sum += p.Weight
		}
		want := 8.0 / 3 * a * a * a
		if !scalar.EqualWithinRel(sum, want, 0.03) {
			t.Errorf("a=%v: high-frequency moment %v m³, want %v", a, sum, want)
		}
	}
}

func TestDiscPolesPositive(t *testing.T) {
	poles := DiscPoles(0.01, 0.0015, 5.96e7)
	if len(poles) == 0 {
		t.Fatal("no poles")
	}
	for _, p := range poles {
		if !(p.Tau > 0 && p.Weight >= 0) {
			t.Errorf("pole %+v", p)
		}
	}
	// The response is passive: R = -Im ≥ 0 at every frequency.
	for _, w := range []float64{1e2, 1e4, 1e6} {
		if im := imag(PolesMoment(poles, w)); im > 0 {
			t.Errorf("w=%v: Im = %v > 0", w, im)
		}
	}
}

// phaseDeg is a forward model's phase in spade's convention.
func phaseDeg(z complex128) float64 {
	p := math.Atan2(-imag(z), real(z)) * 180 / math.Pi
	if p < -90 {
		p += 360
	}
	return p
}

func TestPhaseOrderingAt15kHz(t *testing.T) {
	// Common practice, no source: at about 15 kHz ferrite reads near 0°,
	// iron low (10-40°), thin foil just above 90°, then lead, then solid
	// aluminium and silver near 180°.
	w := 2 * math.Pi * 15000
	ferrite := phaseDeg(SphereMoment(w, 0.01, 0, 1000))
	iron := phaseDeg(SphereMoment(w, 0.005, Conductivity["iron"], RelativePermeability["iron"]))
	foil := phaseDeg(PolesMoment(DiscPoles(0.01, 30e-6, Conductivity["aluminium"]), w))
	lead := phaseDeg(SphereMoment(w, 0.006, Conductivity["lead"], 1))
	alu := phaseDeg(SphereMoment(w, 0.01, Conductivity["aluminium"], 1))
	silver := phaseDeg(PolesMoment(DiscPoles(0.0125, 0.0015, Conductivity["silver"]), w))
	if math.Abs(ferrite) > 0.5 || iron < 10 || iron > 40 || foil < 90 || foil > 110 ||
		!(foil < lead && lead < alu) || alu < 165 || silver < 165 {
		t.Errorf("ferrite %.1f°, iron %.1f°, foil %.1f°, lead %.1f°, aluminium %.1f°, silver %.1f°", ferrite, iron, foil, lead, alu, silver)
	}
}

func TestRingPullAndGoldRingOverlap(t *testing.T) {
	// Common practice, no source: aluminium ring-pulls and gold rings read
	// alike. Over the catalogue's size ranges their time constants overlap.
	pull := [2]float64{math.Inf(1), 0}
	gold := [2]float64{math.Inf(1), 0}
	for _, R := range []float64{0.005, 0.0065} {
		for _, r := range []float64{0.0004, 0.0008} {
			tau := RingPole(R, r, 20e6).Tau
			pull = [2]float64{math.Min(pull[0], tau), math.Max(pull[1], tau)}
		}
	}
	for _, R := range []float64{0.008, 0.0105} {
		for _, r := range []float64{0.0008, 0.0015} {
			for _, s := range []float64{5e6, 16e6} {
				tau := RingPole(R, r, s).Tau
				gold = [2]float64{math.Min(gold[0], tau), math.Max(gold[1], tau)}
			}
		}
	}
	if pull[1] < gold[0] || gold[1] < pull[0] {
		t.Errorf("ring-pull τ %v, gold ring τ %v: no overlap", pull, gold)
	}
}
