// Package overlap finds the ID ranges where a detectorist's single number
// "could be anything" on their own ground with their own machine, and how
// much spade's multi-frequency model resolves there.
//
// The single-number axis (the display ID, or the phase at one frequency) is
// cut into bins; each bin gets its dig count, class shares, entropy in bits
// and top classes. Adjacent bins where the top class's share is below a
// threshold (80 %) or the entropy above one (1 bit) merge into ambiguous
// ranges. Each range lists what collides there, says each keeper's chance in
// plain words, marks ranges where only trash collides, and compares the
// majority-of-bin rule with the model's held-out predictions.
package overlap
