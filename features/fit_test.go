package features

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestSinglePoleLoop(t *testing.T) {
	// Coupled-circuit model of a conducting loop (Grant & West, 1965):
	// phase = 90° + atan(ωτ), and the quadrature peaks at 0.5 at ωτ = 1.
	const tau = 1e-4
	for _, u := range []float64{0.01, 0.3, 1, 3, 100} {
		x, r := Pole(0, 1, tau, u/tau)
		got := Reading{X: x, R: r}.Phase()
		want := 90 + math.Atan(u)*180/math.Pi
		if !scalar.EqualWithinAbs(got, want, 1e-9) {
			t.Errorf("ωτ=%v: phase %v, want %v", u, got, want)
		}
	}
	_, rPeak := Pole(0, 1, tau, 1/tau)
	if !scalar.EqualWithinAbs(rPeak, 0.5, 1e-12) {
		t.Errorf("quadrature at ωτ=1 is %v, want 0.5", rPeak)
	}
	for _, u := range []float64{0.9, 1.1} {
		if _, r := Pole(0, 1, tau, u/tau); r >= rPeak {
			t.Errorf("quadrature at ωτ=%v (%v) not below the peak", u, r)
		}
	}
}

func synth(freqs []int, m, c, tau float64) []Reading {
	rs := make([]Reading, len(freqs))
	for i, hz := range freqs {
		x, r := Pole(m, c, tau, 2*math.Pi*float64(hz))
		rs[i] = Reading{Hz: hz, X: x, R: r}
	}
	return rs
}

func TestFitPoleNoiseless(t *testing.T) {
	// Issue 2: τ within 0.5 %, m and c within 1 %, from 3-5 noiseless
	// frequencies.
	sets := [][]int{{5000, 15000, 45000}, {3000, 9000, 18000, 36000}, {2000, 5000, 10000, 20000, 40000}}
	cases := []struct{ m, c, tau float64 }{
		{0, 1, 1e-5}, {0.2, 1, 3e-5}, {1, 0.3, 5e-6}, {0.5, 2, 1.5e-4}, {0.05, 0.8, 2e-6},
	}
	for _, freqs := range sets {
		for _, k := range cases {
			fit, ok := FitPole(synth(freqs, k.m, k.c, k.tau))
			if !ok {
				t.Fatal("no fit")
			}
			if !scalar.EqualWithinRel(fit.Tau, k.tau, 0.005) || !near(fit.C, k.c, 0.01) || !near(fit.M, k.m, 0.01) {
				t.Errorf("%v Hz, %+v: got τ=%.4g m=%.4g c=%.4g", freqs, k, fit.Tau, fit.M, fit.C)
			}
			if fit.Residual > 1e-6 {
				t.Errorf("%v Hz, %+v: residual %v on noiseless data", freqs, k, fit.Residual)
			}
		}
	}
}

// near compares within rel of the larger of |want| and 1 % of the scale, so
// that a zero m is judged against the target's size.
func near(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Max(math.Abs(want), 1)
}

func TestFitPoleNoisy(t *testing.T) {
	// Issue 2: with 1 % complex noise the fitted τ is within 10 %.
	freqs := []int{5000, 10000, 20000, 40000}
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tau := range []float64{4e-6, 1e-5, 3e-5} {
		for trial := range 20 {
			rs := synth(freqs, 0.1, 1, tau)
			for i := range rs {
				s := 0.01 * rs[i].Amp()
				rs[i].X += s * rng.NormFloat64() / math.Sqrt2
				rs[i].R += s * rng.NormFloat64() / math.Sqrt2
			}
			fit, _ := FitPole(rs)
			if !scalar.EqualWithinRel(fit.Tau, tau, 0.10) {
				t.Errorf("τ=%g trial %d: got %g", tau, trial, fit.Tau)
			}
		}
	}
}

func TestFitPoleOneFrequency(t *testing.T) {
	if _, ok := FitPole(synth([]int{5000}, 0, 1, 1e-5)); ok {
		t.Error("fit from one frequency")
	}
}

func TestFitPoleTwoFrequencies(t *testing.T) {
	// Two complex readings, three unknowns: determined up to noise.
	fit, _ := FitPole(synth([]int{5000, 20000}, 0.3, 1, 1e-5))
	if !scalar.EqualWithinRel(fit.Tau, 1e-5, 0.005) || !near(fit.M, 0.3, 0.01) {
		t.Errorf("got %+v", fit)
	}
}

func TestBrentMinParabola(t *testing.T) {
	// A parabola's minimum is found exactly by the parabolic step.
	f := func(x float64) float64 { return (x - 1.3) * (x - 1.3) }
	x, _ := brentMin(f, 0, 3, 2.5, f(2.5), 1e-9)
	if !scalar.EqualWithinAbs(x, 1.3, 1e-7) {
		t.Errorf("minimum at %v, want 1.3", x)
	}
}

func BenchmarkExtractFourFrequencies(b *testing.B) {
	// Issue 2 target: 200,000 readings a second or more on one core.
	freqs := []int{5000, 10000, 20000, 40000}
	spec := NewSpec(freqs, true)
	rng := rand.New(rand.NewPCG(3, 4))
	digs := make([]Dig, 256)
	for i := range digs {
		rs := synth(freqs, rng.Float64(), rng.Float64()+0.1, math.Pow(10, -6+2*rng.Float64()))
		digs[i] = Dig{Readings: rs, DisplayID: 50}
	}
	dst := make([]float64, spec.Len())
	b.ReportAllocs()
	b.ResetTimer()
	for i := range b.N {
		dst, _, _ = spec.Extract(&digs[i%len(digs)], dst)
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "readings/s")
}
