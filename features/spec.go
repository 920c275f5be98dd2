package features

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// ErrFrequencies is the cause of a FreqMismatchError.
var ErrFrequencies = errors.New("frequencies differ from the model's")

// FeatureSpec fixes the features a model is trained on: the frequencies, the
// reference frequency for amplitude ratios, and the names in vector order.
// Training and classification share it, so that a model can refuse readings
// taken at other frequencies.
type FeatureSpec struct {
	Freqs     []int    `json:"freqs"`
	RefHz     int      `json:"ref_hz"`
	DisplayID bool     `json:"display_id"`
	Names     []string `json:"names"`
}

// Multi-frequency feature names.
const (
	NamePhaseSlope      = "phase_slope"
	NameLog10Tau        = "log10_tau"
	NameFerrousFraction = "ferrous_fraction"
	NameFitResidual     = "fit_residual"
	NameDisplayID       = "display_id"
)

// SpecOf is the spec of a log: its frequencies, and its display ID when
// the log has that column.
func SpecOf(log *Log) *FeatureSpec { return NewSpec(log.Freqs, log.HasDisplayID) }

// NewSpec builds the spec for a log's frequencies (ascending, distinct).
// The lowest frequency is the amplitude reference.
func NewSpec(freqs []int, displayID bool) *FeatureSpec {
	if len(freqs) == 0 {
		panic("features: no frequencies")
	}
	s := &FeatureSpec{Freqs: slices.Clone(freqs), RefHz: freqs[0], DisplayID: displayID}
	for _, hz := range freqs {
		s.Names = append(s.Names, "phase_"+strconv.Itoa(hz))
	}
	if len(freqs) > 1 {
		for _, hz := range freqs[1:] {
			s.Names = append(s.Names, "logamp_"+strconv.Itoa(hz))
		}
		s.Names = append(s.Names, NamePhaseSlope, NameLog10Tau, NameFerrousFraction, NameFitResidual)
	}
	if displayID {
		s.Names = append(s.Names, NameDisplayID)
	}
	return s
}

// Len is the length of a feature vector.
func (s *FeatureSpec) Len() int { return len(s.Names) }

// Index is the position of a named feature, or -1.
func (s *FeatureSpec) Index(name string) int { return slices.Index(s.Names, name) }

// Notes says what the spec leaves out, for the user.
func (s *FeatureSpec) Notes() []string {
	var notes []string
	if len(s.Freqs) == 1 {
		notes = append(notes, fmt.Sprintf("the log has one frequency (%d Hz): no amplitude ratios, phase slope or time-constant fit, so classes that differ only across frequencies cannot be told apart", s.Freqs[0]))
	}
	if !s.DisplayID {
		notes = append(notes, "the log has no display_id column (or some rows lack it): the single-number baseline uses the phase at the reference frequency")
	}
	return notes
}

// Validate checks a spec read from a model file.
func (s *FeatureSpec) Validate() error {
	if len(s.Freqs) == 0 || !slices.IsSorted(s.Freqs) || s.Freqs[0] <= 0 {
		return errors.New("features: spec has no valid frequencies")
	}
	want := NewSpec(s.Freqs, s.DisplayID)
	if !slices.Equal(want.Names, s.Names) || want.RefHz != s.RefHz {
		return errors.New("features: spec names do not match its frequencies")
	}
	return nil
}

// FreqMismatchError names the frequencies a reading lacks and those the
// model does not know.
type FreqMismatchError struct {
	Missing, Unexpected []int
}

func (e *FreqMismatchError) Error() string {
	var parts []string
	if len(e.Missing) > 0 {
		parts = append(parts, "missing "+HzList(e.Missing))
	}
	if len(e.Unexpected) > 0 {
		parts = append(parts, "not in the model "+HzList(e.Unexpected))
	}
	return ErrFrequencies.Error() + ": " + strings.Join(parts, "; ")
}

func (e *FreqMismatchError) Unwrap() error { return ErrFrequencies }

// CheckFreqs reports a *FreqMismatchError unless freqs are the spec's.
func (s *FeatureSpec) CheckFreqs(freqs []int) error {
	if slices.Equal(freqs, s.Freqs) {
		return nil
	}
	e := &FreqMismatchError{}
	for _, hz := range s.Freqs {
		if !slices.Contains(freqs, hz) {
			e.Missing = append(e.Missing, hz)
		}
	}
	for _, hz := range freqs {
		if !slices.Contains(s.Freqs, hz) {
			e.Unexpected = append(e.Unexpected, hz)
		}
	}
	return e
}

// Extract writes the feature vector of d into dst (grown if short) and
// returns it, with the pole fit (zero when the spec has one frequency).
//
// Order of work: ground cancellation (when d carries a ground reading), then
// the per-frequency phases and amplitude ratios, the phase slope, and the
// pole fit. The dig's frequencies must be the spec's and, when the spec uses
// the display ID, the dig must have one.
func (s *FeatureSpec) Extract(d *Dig, dst []float64) ([]float64, PoleFit, error) {
	n := len(s.Freqs)
	if len(d.Readings) != n || !sameHz(d.Readings, s.Freqs) {
		freqs := make([]int, len(d.Readings))
		for i, r := range d.Readings {
			freqs[i] = r.Hz
		}
		return dst, PoleFit{}, s.CheckFreqs(freqs)
	}
	if s.DisplayID && math.IsNaN(d.DisplayID) {
		return dst, PoleFit{}, errors.New("features: the model uses display_id and this reading has none")
	}
	if cap(dst) < len(s.Names) {
		dst = make([]float64, len(s.Names))
	}
	dst = dst[:len(s.Names)]

	var buf [16]Reading
	rs := d.Readings
	if d.Ground != nil {
		if len(d.Ground) != n {
			panic("features: length mismatch")
		}
		var clean []Reading
		if n <= len(buf) {
			clean = buf[:n]
		} else {
			clean = make([]Reading, n)
		}
		CancelGround(clean, d.Readings, d.Ground)
		rs = clean
	}
	k := 0
	for _, r := range rs {
		dst[k] = r.Phase()
		k++
	}
	var fit PoleFit
	if n > 1 {
		// A floor keeps the logarithm finite when ground cancellation leaves
		// no amplitude at all.
		ref := math.Log(math.Max(rs[0].Amp(), 1e-300))
		for _, r := range rs[1:] {
			dst[k] = math.Log(math.Max(r.Amp(), 1e-300)) - ref
			k++
		}
		dst[k] = PhaseSlope(rs)
		fit, _ = FitPole(rs)
		dst[k+1] = math.Log10(fit.Tau)
		dst[k+2] = fit.FerrousFraction()
		dst[k+3] = fit.Residual
		k += 4
	}
	if s.DisplayID {
		dst[k] = d.DisplayID
	}
	return dst, fit, nil
}

func sameHz(rs []Reading, freqs []int) bool {
	for i, r := range rs {
		if r.Hz != freqs[i] {
			return false
		}
	}
	return true
}

// PhaseSlope is the least-squares slope of phase against log10 frequency, in
// degrees per decade: with x = log10 f and y the phase,
//
//	slope = Σ (x - x̄)(y - ȳ) / Σ (x - x̄)²
//
// (ordinary least squares; e.g. Draper & Smith, Applied Regression Analysis,
// 3rd ed. 1998, §1.2, cited from memory). It is gonum's
// stat.LinearRegression written out, so that extraction allocates nothing
// per reading; the tests compare the two. 0 for a single frequency.
func PhaseSlope(rs []Reading) float64 {
	var mx, my float64
	n := float64(len(rs))
	for _, r := range rs {
		mx += math.Log10(float64(r.Hz))
		my += r.Phase()
	}
	mx, my = mx/n, my/n
	var sxy, sxx float64
	for _, r := range rs {
		dx := math.Log10(float64(r.Hz)) - mx
		sxy += dx * (r.Phase() - my)
		sxx += dx * dx
	}
	if sxx == 0 {
		return 0
	}
	return sxy / sxx
}
