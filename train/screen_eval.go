package train

import (
	"context"
	"fmt"
	"math"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

// ScreenEvaluation is how the ordnance screen does on a history: on the
// library's munitions, each group held out from the screen's own fit, and on
// the user's own digs, out of bag. Its JSON is part of evaluate's contract.
type ScreenEvaluation struct {
	Library string `json:"library"`
	Depth   bool   `json:"depth"` // the history has depths, so the depth screen is used
	// Groups are the library's groups, each scored by a screen fitted
	// without it.
	Groups []GroupCatch `json:"groups"`
	// Caught and CaughtDepth pool the groups: shares warned of (either
	// tier), by phase and amplitude alone and with depth.
	Caught      float64 `json:"caught"`
	CaughtDepth float64 `json:"caught_depth,omitempty"`
	// The user's own digs, out of bag, by the screen a model of the whole
	// history carries (the depth forest when there are depths).
	KeeperDigs      int     `json:"keeper_digs"`
	KeepersFlagged  float64 `json:"keepers_flagged"`
	TrashDigs       int     `json:"trash_digs"`
	TrashFlagged    float64 `json:"trash_flagged"`
	OwnHazardDigs   int     `json:"own_hazard_digs"`
	OwnHazardCaught float64 `json:"own_hazard_caught"`
}

// GroupCatch is one held-out group's figures.
type GroupCatch struct {
	Group       string  `json:"group"`
	Readings    int     `json:"readings"`
	Caught      float64 `json:"caught"`
	CaughtDepth float64 `json:"caught_depth,omitempty"`
	Likely      float64 `json:"likely"` // "likely ordnance", with depth when there are depths
}

// heldOutPerGroup is how many readings of each held-out group are scored.
const heldOutPerGroup = 200

// EvaluateScreen measures the screen on a history. keeper says which of the
// user's digs are keepers (nil: none are, and every non-hazard dig counts
// as trash). Progress, when set in o, counts every screen tree grown.
func EvaluateScreen(ctx context.Context, log *features.Log, spec *features.FeatureSpec, o ScreenOptions, keeper func(*features.Dig) bool) (*ScreenEvaluation, error) {
	// One calibration serves the full screen, every held-out one and the
	// held-out groups' readings.
	cal, err := datasets.Calibrate(log)
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrNoScreen, err)
	}
	o.Calibration = &cal
	full, err := TrainScreen(ctx, log, spec, o)
	if err != nil {
		return nil, err
	}
	ev := &ScreenEvaluation{Library: full.Library, Depth: full.Depth != nil, OwnHazardDigs: full.OwnHazardDigs}
	sf := &full.Plain
	if full.Depth != nil {
		sf = full.Depth
	}
	var keptFlag, trashFlag, ownFlag int
	for j, i := range full.history {
		d := &log.Digs[i]
		flagged := sf.historyOOB[j] >= sf.Low
		switch {
		case IsHazard(d, full.Hazards):
			if flagged {
				ownFlag++
			}
		case keeper != nil && keeper(d):
			ev.KeeperDigs++
			if flagged {
				keptFlag++
			}
		default:
			ev.TrashDigs++
			if flagged {
				trashFlag++
			}
		}
	}
	ev.KeepersFlagged = share(keptFlag, ev.KeeperDigs)
	ev.TrashFlagged = share(trashFlag, ev.TrashDigs)
	ev.OwnHazardCaught = share(ownFlag, ev.OwnHazardDigs)

	var n, caught, caughtDepth int
	var buf []float64
	for gi, g := range datasets.MunitionGroups() {
		go1 := o
		go1.Exclude = g
		s, err := TrainScreen(ctx, log, spec, go1)
		if err != nil {
			return nil, err
		}
		test, _, err := datasets.Library(datasets.LibraryOptions{Freqs: log.Freqs, N: heldOutPerGroup, Seed: o.Seed ^ uint64(0x6e1d+gi), Cal: cal, Groups: []string{g}})
		if err != nil {
			return nil, err
		}
		gc := GroupCatch{Group: g, Readings: len(test)}
		var c0, c1, likely int
		for i := range test {
			x, _, err := spec.Extract(&test[i], nil)
			if err != nil {
				return nil, err
			}
			amp, size := ScreenExtras(&test[i])
			var r ScreenResult
			r, buf = s.Score(x, amp, math.NaN(), buf)
			if r.Tier > 0 {
				c0++
			}
			if s.Depth == nil && r.Tier == 2 {
				likely++
			}
			if s.Depth != nil {
				r, buf = s.Score(x, amp, size, buf)
				if r.Tier > 0 {
					c1++
				}
				if r.Tier == 2 {
					likely++
				}
			}
		}
		gc.Caught, gc.Likely = share(c0, len(test)), share(likely, len(test))
		if s.Depth != nil {
			gc.CaughtDepth = share(c1, len(test))
		}
		ev.Groups = append(ev.Groups, gc)
		n += len(test)
		caught += c0
		caughtDepth += c1
	}
	ev.Caught = share(caught, n)
	if ev.Depth {
		ev.CaughtDepth = share(caughtDepth, n)
	}
	return ev, nil
}
