package main

import (
	"errors"
	"fmt"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
)

// modelProbs takes the digs' held-out probabilities from a model file
// (Bundle.HeldOut), after the checks a command line needs.
func modelProbs(path string, kind features.Label, log *features.Log, ds *train.Dataset) ([][]float64, []string, error) {
	b, err := train.Load(path)
	if err != nil {
		return nil, nil, err
	}
	if b.Label != kind {
		return nil, nil, usagef("the model tells %s apart; give --label %s", b.Label, b.Label)
	}
	probs, notes, err := b.HeldOut(log, ds)
	if errors.Is(err, train.ErrOtherLog) {
		return nil, nil, fmt.Errorf("--model %s: %w; train a model on this log, or leave out --model to cross-validate", path, err)
	}
	return probs, notes, err
}
