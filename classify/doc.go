// Package classify answers the field question, "what is it, and is it worth
// digging?": probabilities per class for a new reading, the nearest past
// digs that explain them, a novelty score that says when the history has
// nothing like it, the hazard caution, and the dig decision by the user's
// own values.
//
// # Safety
//
// A hazardous class (by default any shape "ordnance") at or above the caution
// threshold (1 % unless the values file says otherwise) puts the caution
// first: do not dig, mark the spot, report it to the authorities. Such a
// reading is never called safe. A probability is never a guarantee.
package classify
