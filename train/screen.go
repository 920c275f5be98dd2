package train

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

// DefaultHazards are the names (of a class, a material or a shape) that mark
// a dig as hazardous when nothing else is said.
var DefaultHazards = []string{"ordnance"}

// Screen is the ordnance screen: a second forest, beside the history's,
// that tells readings of spade's munitions library (simulated at the
// history's frequencies, on its ground, at its noise floor: see
// datasets.Library) from the user's own digs. Almost no personal history
// holds ordnance, so the history's forest alone cannot warn of it; the
// screen can. Library targets appear in no other part of the model: not in
// the neighbours, the class counts, the dig saving or any per-class table.
//
// The screen's score is its forest's share for the library class. With the
// library as large as the history it reads as a probability in a world
// where munitions are as common as everything else dug, so it is an alarm
// level, not the chance that a signal is a shell. Each forest has its own
// tiers, fitted to the history (see fitTiers).
type Screen struct {
	Library       string        `json:"library"` // datasets.LibraryVersion
	LibraryDigs   int           `json:"library_digs"`
	HistoryDigs   int           `json:"history_digs"`
	OwnHazardDigs int           `json:"own_hazard_digs"` // the history's hazardous digs, learnt with the library
	Hazards       []string      `json:"hazards"`
	Trees         int           `json:"trees"`
	Calibration   ScreenCal     `json:"calibration"`
	Plain         ScreenForest  `json:"plain"`           // phase and amplitude only
	Depth         *ScreenForest `json:"depth,omitempty"` // with depth, when the history has depths
	history       []int         // the log's digs the screen learnt from, after training
}

// ScreenForest is one of the screen's forests with its tiers and figures:
// "cannot be ruled out" from Low, "likely ordnance" from High when Likely.
//
// Only the depth forest says "likely ordnance". By phase and amplitude
// alone a shell deep and a lead ball shallow can read alike (it is their
// sizes that differ, and size needs the depth), so without a depth the
// screen says at most "cannot be ruled out": the same "do not dig", in
// words that do not overclaim.
type ScreenForest struct {
	Names    []string      `json:"names"`
	Low      float64       `json:"low"`
	High     float64       `json:"high"`
	Likely   bool          `json:"likely"`
	OutOfBag ScreenFigures `json:"out_of_bag"`
	forest   *Forest
	// historyOOB are the out-of-bag scores of the history's digs that the
	// screen learnt from (Screen.history gives their places in the log);
	// kept only after training, for EvaluateScreen.
	historyOOB []float64
}

// ScreenCal is the instrument as the library was fitted to it.
type ScreenCal struct {
	Gain       float64 `json:"gain"`
	NoiseFloor float64 `json:"noise_floor"`
	Threshold  float64 `json:"threshold"`
	FromDepth  bool    `json:"gain_from_depth"`
	Grounds    int     `json:"ground_readings"`
}

// ScreenFigures are the screen's out-of-bag figures: each reading scored
// only by the trees that did not see it.
type ScreenFigures struct {
	LibraryCaught   float64 `json:"library_caught"`    // share of library munitions at or above Low
	LibraryLikely   float64 `json:"library_likely"`    // share at or above High (likely ordnance)
	DigsFlagged     float64 `json:"digs_flagged"`      // share of the history's other digs at or above Low
	OwnHazardCaught float64 `json:"own_hazard_caught"` // share of the history's hazardous digs at or above Low; 0 without them
}

// The screen's own features beyond the spec's: log10 of the strongest
// amplitude, in the instrument's units (the library is calibrated to them),
// and, for the depth screen, log10 of the apparent size, amplitude ×
// distance⁶ (datasets.ApparentSize).
const (
	NameAmplitude = "log10_amplitude"
	NameSize      = "log10_apparent_size"
)

// The screen's tiers (see fitTiers).
const (
	treeMajority   = 0.5
	minLow         = 0.1
	lowCatchTarget = 0.99
	maxLikelyFlags = 0.01
	screenClasses  = 2 // "history", "munition"
)

var screenClassNames = []string{"history", "munition"}

// IsHazard reports whether a dig is hazardous by the names: its material,
// its shape or its joint class is one of them.
func IsHazard(d *features.Dig, hazards []string) bool {
	return slices.Contains(hazards, d.Material) || slices.Contains(hazards, d.Shape) ||
		(d.Material != "" && slices.Contains(hazards, d.Material+"/"+d.Shape))
}

// ScreenOptions for TrainScreen.
type ScreenOptions struct {
	Trees   int    // default 100
	Seed    uint64 // the same seed and history give the same screen
	Hazards []string
	Library int    // library readings; default the history's size within [1000, 4000]
	Exclude string // a library group to leave out (for held-out figures)
	// MaxFlagged is the most of the history's own digs that "cannot be
	// ruled out" may flag, out of bag; default 0.15.
	MaxFlagged float64
	// Calibration, when set, is the history's (datasets.Calibrate), so
	// that screens fitted to one history again and again calibrate once.
	Calibration *datasets.Calibration
	Progress    func(done int)
}

// ErrNoScreen says the history cannot carry a screen (too few digs or no
// usable amplitude); a model without a screen says it cannot warn.
var ErrNoScreen = errors.New("train: no ordnance screen")

// maxScreenHistory bounds how many of the history's digs the screen learns
// from, evenly spaced: beyond it more digs of everyday finds add little.
const maxScreenHistory = 20000

// TrainScreen fits the ordnance screen to a history: the library at the
// history's frequencies and calibration against the history's digs.
func TrainScreen(ctx context.Context, log *features.Log, spec *features.FeatureSpec, o ScreenOptions) (s *Screen, err error) {
	if o.Trees <= 0 {
		o.Trees = 100
	}
	if o.Hazards == nil {
		o.Hazards = DefaultHazards
	}
	if o.MaxFlagged <= 0 {
		o.MaxFlagged = 0.15
	}
	if o.Library <= 0 {
		o.Library = min(max(len(log.Digs), 1000), 4000)
	}
	var cal datasets.Calibration
	if o.Calibration != nil {
		cal = *o.Calibration
	} else if cal, err = datasets.Calibrate(log); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrNoScreen, err)
	}
	lib, _, err := datasets.Library(datasets.LibraryOptions{Freqs: log.Freqs, N: o.Library, Seed: o.Seed ^ 0x5c7ee, Cal: cal, Exclude: o.Exclude})
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrNoScreen, err)
	}
	s = &Screen{
		Library: datasets.LibraryVersion, LibraryDigs: len(lib), Hazards: o.Hazards, Trees: o.Trees,
		Calibration: ScreenCal{Gain: cal.Gain, NoiseFloor: cal.NoiseFloor, Threshold: cal.Threshold, FromDepth: cal.FromDepth, Grounds: len(cal.Grounds)},
	}
	step := max(1, (len(log.Digs)+maxScreenHistory-1)/maxScreenHistory)
	var hist []*features.Dig
	for i := 0; i < len(log.Digs); i += step {
		hist = append(hist, &log.Digs[i])
		s.history = append(s.history, i)
	}
	s.HistoryDigs = len(hist)
	withDepth := 0
	for _, d := range hist {
		if d.DepthCM >= 0 {
			withDepth++
		}
	}

	rows, y, own, err := screenRows(log, spec, hist, lib, o.Hazards)
	if err != nil {
		return nil, err
	}
	for _, h := range own {
		if h {
			s.OwnHazardDigs++
		}
	}
	fit := func(withSize bool) (*ScreenForest, error) {
		return fitScreenForest(ctx, spec, rows, y, own, withSize, o)
	}
	plain, err := fit(false)
	if err != nil {
		return nil, err
	}
	s.Plain = *plain
	if withDepth == len(hist) {
		if s.Depth, err = fit(true); err != nil {
			return nil, err
		}
	}
	return s, nil
}

// screenRows are the screen's training rows, the history's digs first
// (class 1 when hazardous, own marking them) and then the library's (class
// 1): each dig's features and the screen's extras (amplitude and size).
func screenRows(log *features.Log, spec *features.FeatureSpec, hist []*features.Dig, lib []features.Dig, hazards []string) (rows [][]float64, y []int32, own []bool, err error) {
	add := func(d *features.Dig, class int32) error {
		v, _, err := spec.Extract(d, nil)
		if err != nil {
			return err
		}
		amp, size := ScreenExtras(d)
		rows = append(rows, append(v, amp, size))
		y = append(y, class)
		return nil
	}
	for _, d := range hist {
		h := IsHazard(d, hazards)
		own = append(own, h)
		class := int32(0)
		if h {
			class = 1
		}
		if err := add(d, class); err != nil {
			return nil, nil, nil, features.DigError(log.Name, d, err)
		}
	}
	for i := range lib {
		if err := add(&lib[i], 1); err != nil {
			return nil, nil, nil, fmt.Errorf("train: the munitions library: %w", err)
		}
	}
	return rows, y, own, nil
}

// fitScreenForest grows one of the screen's forests on rows (with the size
// feature when withSize) and fits its tiers on its out-of-bag scores.
func fitScreenForest(ctx context.Context, spec *features.FeatureSpec, rows [][]float64, y []int32, own []bool, withSize bool, o ScreenOptions) (*ScreenForest, error) {
	names := append(slices.Clone(spec.Names), NameAmplitude)
	if withSize {
		names = append(names, NameSize)
	}
	width := len(names)
	ds := &Dataset{Names: names, Classes: screenClassNames, Cols: make([][]float64, width), Y: y}
	for f := range width {
		ds.Cols[f] = make([]float64, len(rows))
		for i, r := range rows {
			ds.Cols[f][i] = r[f]
		}
	}
	f, oob, err := Grow(ctx, ds, Options{Trees: o.Trees, Seed: o.Seed ^ 0x5c2ee2, Progress: o.Progress})
	if err != nil {
		return nil, err
	}
	scores := make([]float64, len(oob))
	for i, p := range oob {
		scores[i] = p[1]
		if math.IsNaN(p[1]) {
			scores[i] = 1 // seen by every tree: counted as flagged, never as missed
		}
	}
	sf := &ScreenForest{Names: f.Names, forest: f, Likely: withSize, historyOOB: scores[:len(own)]}
	sf.fitTiers(scores, own, o.MaxFlagged)
	return sf, nil
}

// fitTiers sets the tiers from the out-of-bag scores: rows first the
// history's (own[i] true for its hazardous digs), then the library's.
//
// Low is the score that catches lowCatchTarget of the library, raised
// where that would flag more than maxFlagged of the history's other digs,
// but never above a majority of the trees: a reading most trees take for a
// munition always warns. High, "likely ordnance", is the least score from
// a majority on that flags at most maxLikelyFlags of the history's digs: a
// reading more munition-like than nearly everything the user has dug.
func (sf *ScreenForest) fitTiers(scores []float64, own []bool, maxFlagged float64) {
	libScores := scores[len(own):]
	var digScores []float64
	for i, h := range own {
		if !h {
			digScores = append(digScores, scores[i])
		}
	}
	slices.Sort(digScores)
	// above is the least threshold that flags at most a share f of the digs.
	above := func(f float64) float64 {
		k := int(math.Floor((1 - f) * float64(len(digScores))))
		if k >= len(digScores) {
			return 0
		}
		return math.Nextafter(digScores[k], 2)
	}
	low := math.Max(lowerQuantile(libScores, 1-lowCatchTarget), above(maxFlagged))
	sf.Low = min(max(low, minLow), treeMajority)
	sf.High = 1
	if sf.Likely {
		sf.High = min(math.Max(treeMajority, above(maxLikelyFlags)), 1)
	}
	var caught, likely, flagged, ownCaught, owned int
	for _, v := range libScores {
		if v >= sf.Low {
			caught++
		}
		if sf.Likely && v >= sf.High {
			likely++
		}
	}
	for _, v := range digScores {
		if v >= sf.Low {
			flagged++
		}
	}
	for i, h := range own {
		if h {
			owned++
			if scores[i] >= sf.Low {
				ownCaught++
			}
		}
	}
	sf.OutOfBag = ScreenFigures{
		LibraryCaught: share(caught, len(libScores)), LibraryLikely: share(likely, len(libScores)),
		DigsFlagged: share(flagged, len(digScores)), OwnHazardCaught: share(ownCaught, owned),
	}
}

func share(n, of int) float64 {
	if of == 0 {
		return 0
	}
	return float64(n) / float64(of)
}

// lowerQuantile is the largest value v such that at least 1-q of the values
// are ≥ v.
func lowerQuantile(v []float64, q float64) float64 {
	if len(v) == 0 {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	return s[int(math.Floor(q*float64(len(s))))]
}

// ScreenExtras are a dig's NameAmplitude and NameSize; the size is NaN
// without a depth.
func ScreenExtras(d *features.Dig) (logAmp, logSize float64) {
	amp := 0.0
	for _, r := range d.Readings {
		amp = math.Max(amp, r.Amp())
	}
	amp = math.Max(amp, 1e-300)
	if !(d.DepthCM >= 0) {
		return math.Log10(amp), math.NaN()
	}
	return math.Log10(amp), math.Log10(math.Max(datasets.ApparentSize(amp, d.DepthCM), 1e-300))
}

// parts are the screen's forests in file order.
func (s *Screen) parts() []*ScreenForest {
	if s == nil {
		return nil
	}
	p := []*ScreenForest{&s.Plain}
	if s.Depth != nil {
		p = append(p, s.Depth)
	}
	return p
}

func (s *Screen) forests() []*Forest {
	var f []*Forest
	for _, p := range s.parts() {
		f = append(f, p.forest)
	}
	return f
}

// ScreenResult is one reading's score.
type ScreenResult struct {
	Score     float64
	Tier      int // 0 none, 1 cannot be ruled out, 2 likely ordnance
	UsedDepth bool
}

// Score scores a feature vector x (the spec's features) with the dig's
// ScreenExtras (size NaN when its depth is unknown): by the depth forest
// when there is one and the size is known, else by the plain one. buf is
// scratch space, reused.
func (s *Screen) Score(x []float64, logAmp, logSize float64, buf []float64) (ScreenResult, []float64) {
	sf := &s.Plain
	in := append(append(buf[:0], x...), logAmp)
	var r ScreenResult
	if s.Depth != nil && !math.IsNaN(logSize) && !math.IsInf(logSize, 0) {
		sf, r.UsedDepth = s.Depth, true
		in = append(in, logSize)
	}
	var p [screenClasses]float64
	r.Score = sf.forest.Predict(in, p[:0])[1]
	switch {
	case sf.Likely && r.Score >= sf.High:
		r.Tier = 2
	case r.Score >= sf.Low:
		r.Tier = 1
	}
	return r, in
}

// Describe says in one sentence what the screen is and how it did.
func (s *Screen) Describe() string {
	f := s.Plain.OutOfBag
	depth := "your log has no depths, so it judges by phase and amplitude alone"
	if s.Depth != nil {
		f = s.Depth.OutOfBag
		depth = "with a reading's depth when it has one"
	}
	return fmt.Sprintf("ordnance screen on: %d simulated munitions (%s) at your frequencies, ground and noise, %s; out of bag it catches %.0f%% of them and flags %.0f%% of your other digs",
		s.LibraryDigs, s.Library, depth, 100*f.LibraryCaught, 100*f.DigsFlagged)
}

// HazardNames lists hazards as a person writes a list.
func HazardNames(h []string) string { return features.ListAnd(h) }

// ScreenTrees is how many trees TrainScreen grows on log, for a progress
// display: o.Trees (default 100) for the screen by phase and amplitude,
// and as many again for the screen with depth when every dig has a depth.
func ScreenTrees(log *features.Log, o ScreenOptions) int {
	n := o.Trees
	if n <= 0 {
		n = 100
	}
	for i := range log.Digs {
		if !(log.Digs[i].DepthCM >= 0) {
			return n
		}
	}
	return 2 * n
}
