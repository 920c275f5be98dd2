// Package classify answers the field question, "what is it, and is it worth
// digging?": probabilities per class for a new reading, the nearest past
// digs that explain them, a novelty score that says when the history has
// nothing like it, the hazard caution, and the dig decision by the user's
// own values.
//
// # Why nearest digs, not an isolation forest, for novelty
//
// golearn's trees.IsolationForest was the other candidate. It cannot be
// saved, so it would be refit from the stored vectors on every load, and it
// draws from the global math/rand, so the fit repeats only with
// //go:debug randseednop=0 and a rand.Seed before each fit. The distance to
// the nearest past digs is deterministic, needs nothing beyond the vectors
// the model already holds for its explanations, and is the same number the
// user reads beside each neighbour. It is measured in the history's whitened
// (Mahalanobis) space, so that a reading whose features are each ordinary
// but whose pattern is unlike any past dig still lies far from all of them.
//
// # Safety
//
// A hazardous class (by default any shape "ordnance") at or above the caution
// threshold (1 % unless the values file says otherwise) puts the caution
// first: do not dig, mark the spot, report it to the authorities. Such a
// reading is never called safe. A probability is never a guarantee.
package classify
