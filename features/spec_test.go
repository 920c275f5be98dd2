package features

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat"
)

// TestPhaseSlopeIsGonumsRegression: the written-out slope equals gonum's
// stat.LinearRegression on the same points within 1e-12 relative, on the
// demo's four frequencies and on an uneven five, and is 0 for one.
func TestPhaseSlopeIsGonumsRegression(t *testing.T) {
	for _, c := range []struct {
		hz     []int
		phases []float64
	}{
		{[]int{4300, 9700, 21700, 36300}, []float64{111.8, 129.0, 147.5, 163.2}},
		{[]int{1000, 3100, 8000, 16100, 40000}, []float64{12, 30.5, 29.0, 71.25, 178}},
	} {
		var rs []Reading
		var x []float64
		for i, hz := range c.hz {
			rs = append(rs, Reading{Hz: hz, X: math.Cos(c.phases[i] * math.Pi / 180), R: math.Sin(c.phases[i] * math.Pi / 180)})
			x = append(x, math.Log10(float64(hz)))
		}
		var y []float64
		for _, r := range rs {
			y = append(y, r.Phase())
		}
		_, want := stat.LinearRegression(x, y, nil, false)
		if got := PhaseSlope(rs); !scalar.EqualWithinRel(got, want, 1e-12) {
			t.Errorf("%v Hz: slope %.15g, gonum's %.15g", c.hz, got, want)
		}
	}
	if got := PhaseSlope([]Reading{{Hz: 9700, X: 0.1, R: 1}}); got != 0 {
		t.Errorf("one frequency: slope %g, want 0", got)
	}
}

func TestSpecNames(t *testing.T) {
	s := NewSpec([]int{5000, 10000, 20000}, true)
	want := "phase_5000 phase_10000 phase_20000 logamp_10000 logamp_20000 phase_slope log10_tau ferrous_fraction fit_residual display_id"
	if got := strings.Join(s.Names, " "); got != want {
		t.Errorf("names\n got %s\nwant %s", got, want)
	}
	if err := s.Validate(); err != nil {
		t.Error(err)
	}
	one := NewSpec([]int{8000}, false)
	if got := strings.Join(one.Names, " "); got != "phase_8000" {
		t.Errorf("one frequency: %s", got)
	}
	if len(one.Notes()) != 2 {
		t.Errorf("one frequency, no display ID: want two notes, got %q", one.Notes())
	}
}

func TestExtractValues(t *testing.T) {
	freqs := []int{5000, 20000}
	spec := NewSpec(freqs, false)
	d := Dig{Readings: synth(freqs, 0, 2, 1e-5)}
	v, fit, err := spec.Extract(&d, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, hz := range freqs {
		// 90° + atan(ωτ), Grant & West (1965).
		want := 90 + math.Atan(2*math.Pi*float64(hz)*1e-5)*180/math.Pi
		if !scalar.EqualWithinAbs(v[i], want, 1e-9) {
			t.Errorf("phase_%d = %v, want %v", hz, v[i], want)
		}
	}
	// logamp is ln(|z(20k)| / |z(5k)|); |z| = c·u/sqrt(1+u²) for a pure pole.
	u1, u2 := 2*math.Pi*5000*1e-5, 2*math.Pi*20000*1e-5
	wantLog := math.Log(u2/math.Sqrt(1+u2*u2)) - math.Log(u1/math.Sqrt(1+u1*u1))
	if !scalar.EqualWithinAbs(v[spec.Index("logamp_20000")], wantLog, 1e-9) {
		t.Errorf("logamp = %v, want %v", v[spec.Index("logamp_20000")], wantLog)
	}
	if !scalar.EqualWithinAbs(v[spec.Index("log10_tau")], -5, 0.002) || fit.FerrousFraction() > 1e-3 {
		t.Errorf("log10_tau %v, ferrous fraction %v", v[spec.Index("log10_tau")], fit.FerrousFraction())
	}
}

func TestExtractRefusesOtherFrequencies(t *testing.T) {
	spec := NewSpec([]int{5000, 10000, 20000}, false)
	d := Dig{Readings: synth([]int{5000, 20000, 40000}, 0, 1, 1e-5)}
	_, _, err := spec.Extract(&d, nil)
	var fm *FreqMismatchError
	if !errors.As(err, &fm) || !errors.Is(err, ErrFrequencies) {
		t.Fatalf("error %v", err)
	}
	if msg := err.Error(); !strings.Contains(msg, "missing 10000 Hz") || !strings.Contains(msg, "not in the model 40000 Hz") {
		t.Errorf("message %q does not name both frequencies", msg)
	}
}

func TestExtractNeedsDisplayID(t *testing.T) {
	spec := NewSpec([]int{5000, 20000}, true)
	d := Dig{Readings: synth([]int{5000, 20000}, 0, 1, 1e-5), DisplayID: math.NaN()}
	if _, _, err := spec.Extract(&d, nil); err == nil {
		t.Error("no error for a missing display ID")
	}
}
