package classify

import (
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// unfamiliarShare is the share of query vectors a history's novelty space
// flags unfamiliar (above the 99th percentile of its own digs' scores).
func unfamiliarShare(history, queries [][]float64) float64 {
	s := newSpace(history, nil)
	ref := s.referenceScores()
	var nb []Neighbour
	var std []float64
	flagged := 0
	for _, q := range queries {
		std = s.standardise(q, std)
		nb = s.nearest(std, noveltyK, -1, nb)
		if percentile(ref, meanDistance(nb)) > UnfamiliarPercentile {
			flagged++
		}
	}
	return float64(flagged) / float64(len(queries))
}

// TestNoveltyLeaveOneClassOut measures issue 12's novelty question: what
// share of a class the history lacks is flagged unfamiliar. Run with -v
// for the README's figures. Nearest-neighbour novelty flags readings far
// from every past dig, and most of a missing class lies near some other
// class, so the shares are low; that is why ordnance needs the screen, and
// why "unfamiliar" is a warning sign and never an all-clear.
func TestNoveltyLeaveOneClassOut(t *testing.T) {
	_, log := demoModel(t)
	spec := features.NewSpec(log.Freqs, log.HasDisplayID)
	ds, err := train.FromLog(log, spec, features.LabelBoth)
	if err != nil {
		t.Fatal(err)
	}
	var mean float64
	for k, c := range ds.Classes {
		var hist, held [][]float64
		for i := range ds.Rows() {
			if int(ds.Y[i]) == k {
				held = append(held, ds.Row(i, nil))
			} else {
				hist = append(hist, ds.Row(i, nil))
			}
		}
		share := unfamiliarShare(hist, held)
		mean += share / float64(len(ds.Classes))
		t.Logf("%-22s %4d digs held out: %.1f%% unfamiliar", c, len(held), 100*share)
	}
	t.Logf("mean over classes: %.1f%% (1%% of a history's own digs, by construction)", 100*mean)
	// The library's munitions against the history without its ordnance.
	var hist [][]float64
	var noOrd []features.Dig
	for i := range ds.Rows() {
		if ds.Classes[ds.Y[i]] != "steel/ordnance" {
			hist = append(hist, ds.Row(i, nil))
			noOrd = append(noOrd, log.Digs[i])
		}
	}
	cal, err := datasets.Calibrate(&features.Log{Freqs: log.Freqs, Digs: noOrd, HasDisplayID: true})
	if err != nil {
		t.Fatal(err)
	}
	lib, _, err := datasets.Library(datasets.LibraryOptions{Freqs: log.Freqs, N: 500, Seed: 3, Cal: cal})
	if err != nil {
		t.Fatal(err)
	}
	var q [][]float64
	for i := range lib {
		v, _, _ := spec.Extract(&lib[i], nil)
		q = append(q, v)
	}
	libShare := unfamiliarShare(hist, q)
	t.Logf("library munitions against the history without ordnance: %.1f%% unfamiliar", 100*libShare)
	// Measured 2026-12-02: 1.3 % of held-out classes and 0 % of the
	// library flagged, barely more than the history's own 1 %. The novelty
	// flag is no detector of new kinds of object (the README says so); the
	// bound only catches a flag gone wild, which would bury real warnings.
	if mean > 0.2 || libShare > 0.2 {
		t.Errorf("held-out classes %.3f, library %.3f unfamiliar", mean, libShare)
	}
	// And the history's own digs, left out one at a time, are flagged at
	// about 1 %, by the definition of the 99th percentile.
	if own := unfamiliarShare(hist, hist); own > 0.011 {
		t.Errorf("the history's own digs: %.3f unfamiliar", own)
	}
}
