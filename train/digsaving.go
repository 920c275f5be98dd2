package train

import (
	"slices"
)

// SavingPoint is one point of the dig-saving curve: keeping at least Keep of
// the keeper digs, the share of trash digs that could have been left in the
// ground, skipping every reading scored below Threshold.
type SavingPoint struct {
	Keep         float64 `json:"keep"`
	TrashSkipped float64 `json:"trash_skipped"`
	Threshold    float64 `json:"threshold"`
	// The same in digs: keepers lost (scored below the threshold) of all
	// keepers, and trash digs skipped of all trash.
	KeepersLost int `json:"keepers_lost"`
	Keepers     int `json:"keepers"`
	TrashSkips  int `json:"trash_skipped_digs"`
	Trash       int `json:"trash"`
}

// DigSaving compares the dig-saving curves of the model and the baseline on
// the same cross-validated predictions. A keeper is a class the user wants;
// hazardous classes are neither keeper nor trash (they are never to be dug)
// and are left out of the curve.
type DigSaving struct {
	Keepers    []string      `json:"keepers"`
	Hazards    []string      `json:"hazards"`
	KeeperDigs int           `json:"keeper_digs"`
	TrashDigs  int           `json:"trash_digs"`
	Model      []SavingPoint `json:"model,omitempty"` // nil when only the baseline was measured
	Baseline   []SavingPoint `json:"baseline"`
}

// SavingLevels are the keeper shares the curve is reported at.
var SavingLevels = []float64{0.95, 0.99, 1.0}

// SavingCurve scores each dig by its keeper probability. For each level the
// threshold is the highest score that still keeps that share of keepers
// (scored >= threshold); trash scored strictly below it counts as skipped.
// It is an operating point read off the pooled predictions, as an ROC curve
// is, not a threshold tuned on separate data.
func SavingCurve(score []float64, keeper, trash []bool, levels []float64) []SavingPoint {
	var ks, ts []float64
	for i, s := range score {
		switch {
		case keeper[i]:
			ks = append(ks, s)
		case trash[i]:
			ts = append(ts, s)
		}
	}
	slices.Sort(ks)
	out := make([]SavingPoint, len(levels))
	for j, level := range levels {
		out[j].Keep = level
		out[j].Keepers, out[j].Trash = len(ks), len(ts)
		if len(ks) == 0 || len(ts) == 0 {
			continue
		}
		// Allowed to lose floor((1-level)·n) keepers, the lowest scored.
		lose := int((1 - level) * float64(len(ks)) * (1 + 1e-12))
		thr := ks[lose]
		skipped := 0
		for _, s := range ts {
			if s < thr {
				skipped++
			}
		}
		out[j].Threshold = thr
		out[j].TrashSkipped = float64(skipped) / float64(len(ts))
		out[j].TrashSkips = skipped
		for _, s := range ks {
			if s < thr {
				out[j].KeepersLost++
			}
		}
	}
	return out
}

// KeeperScore is Σ p over keeper classes.
func KeeperScore(p []float64, keeper []bool) float64 {
	var s float64
	for k, v := range p {
		if keeper[k] {
			s += v
		}
	}
	return s
}
