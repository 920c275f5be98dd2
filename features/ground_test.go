package features

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// viscousSoil is a magnetic-viscosity soil, log-uniform relaxation times:
//
//	χ(ω) = χ0 - D·[ln(ωτ2) + iπ/2]
//
// (Lee, "The effect of magnetic viscosity on transient electromagnetic
// measurements", 1984; the frequency-domain form used in UXO and mineral
// work). In spade's components X = Re χ, R = -Im χ.
func viscousSoil(hz int, chi0, D, tau2 float64) Reading {
	w := 2 * math.Pi * float64(hz)
	return Reading{Hz: hz, X: chi0 - D*math.Log(w*tau2), R: D * math.Pi / 2}
}

func TestViscousSoilQuadratureRatio(t *testing.T) {
	// The quadrature divided by the in-phase drop per decade is
	// (π/2)/ln 10 = 0.682 for log-uniform relaxation times.
	a, b := viscousSoil(1000, 1e-3, 2e-5, 1e-6), viscousSoil(10000, 1e-3, 2e-5, 1e-6)
	got := a.R / (a.X - b.X)
	if !scalar.EqualWithinAbs(got, 0.682, 0.0005) || !scalar.EqualWithinAbs(got, math.Pi/2/math.Ln10, 1e-12) {
		t.Errorf("ratio %v, want 0.682", got)
	}
}

func TestCancelGroundRemovesSoil(t *testing.T) {
	freqs := []int{5000, 10000, 20000, 40000}
	soil := make([]Reading, len(freqs))
	for i, hz := range freqs {
		soil[i] = viscousSoil(hz, 1e-3, 2e-5, 1e-6)
	}
	// Pure ground under the coil, at another coil height (k = 1.6):
	// cancellation leaves nothing.
	under := make([]Reading, len(freqs))
	for i, g := range soil {
		under[i] = Reading{Hz: g.Hz, X: 1.6 * g.X, R: 1.6 * g.R}
	}
	out := make([]Reading, len(freqs))
	k := CancelGround(out, under, soil)
	if !scalar.EqualWithinRel(k, 1.6, 1e-12) {
		t.Errorf("k = %v, want 1.6", k)
	}
	for _, r := range out {
		if r.Amp() > 1e-15 {
			t.Errorf("left %v after cancelling pure soil", r)
		}
	}
	// A conductor (τ = 10 µs) over strong soil: the soil swamps the
	// target's phase until it is cancelled, and the fitted τ comes back.
	target := synth(freqs, 0, 2e-4, 1e-5)
	total := make([]Reading, len(freqs))
	for i := range target {
		total[i] = Reading{Hz: freqs[i], X: target[i].X + 1.8*soil[i].X, R: target[i].R + 1.8*soil[i].R}
	}
	CancelGround(out, total, soil)
	raw, _ := FitPole(total)
	clean, _ := FitPole(out)
	if !scalar.EqualWithinRel(clean.Tau, 1e-5, 0.05) {
		t.Errorf("τ after cancellation %g, want 1e-5 within 5%%", clean.Tau)
	}
	if math.Abs(raw.Tau-1e-5) < 5*math.Abs(clean.Tau-1e-5) {
		t.Errorf("cancellation did not help: raw τ %g, clean τ %g", raw.Tau, clean.Tau)
	}
}

func TestCancelGroundNeverAddsSoil(t *testing.T) {
	// The coefficient is non-negative: a target anti-parallel to the soil
	// is left alone rather than having soil added.
	g := []Reading{{Hz: 5000, X: 1, R: 0}}
	tg := []Reading{{Hz: 5000, X: -1, R: 0.1}}
	out := make([]Reading, 1)
	if k := CancelGround(out, tg, g); k != 0 || out[0] != tg[0] {
		t.Errorf("k = %v, out %v", k, out[0])
	}
}

func TestCancelGroundSparesFerrousTarget(t *testing.T) {
	// An iron-like target (small phase, like the soil's) ten times the
	// logged ground: the capped coefficient removes at most twice the ground
	// reading and leaves the target's phase and most of its amplitude.
	freqs := []int{5000, 10000, 20000, 40000}
	soil := make([]Reading, len(freqs))
	target := synth(freqs, 1, 0.3, 2e-5) // mostly in-phase, phase 5-15°
	total := make([]Reading, len(freqs))
	for i, hz := range freqs {
		soil[i] = viscousSoil(hz, 1e-3, 2e-5, 1e-6)
		s := 0.1 * target[i].Amp() / soil[i].Amp()
		soil[i] = Reading{Hz: hz, X: s * soil[i].X, R: s * soil[i].R}
		total[i] = Reading{Hz: hz, X: target[i].X + soil[i].X, R: target[i].R + soil[i].R}
	}
	out := make([]Reading, len(freqs))
	if k := CancelGround(out, total, soil); k != MaxGroundShare {
		t.Errorf("k = %v, want the cap %v", k, MaxGroundShare)
	}
	for i := range out {
		if out[i].Amp() < 0.8*target[i].Amp() || math.Abs(out[i].Phase()-target[i].Phase()) > 3 {
			t.Errorf("%d Hz: %v left of target %v", freqs[i], out[i], target[i])
		}
	}
}
