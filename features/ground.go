package features

// MaxGroundShare is the most of the ground reading CancelGround removes.
const MaxGroundShare = 2.0

// CancelGround removes the soil's share from a target's readings.
//
// The soil under the coil adds k·G(ω) to the target's response, where G is
// the ground's spectrum as read beside the target and k >= 0 grows as the coil
// comes nearer the soil; the spectral shape of G does not change with coil
// height. k is the non-negative real least-squares coefficient
//
//	k = max(0, Re Σ conj(G_j)·T_j / Σ |G_j|²)
//
// and the result is T - k·G, with k also held at or below MaxGroundShare. A
// ground reading of zero amplitude leaves the target as it is. target and
// ground must have the same length; out may alias target.
//
// Why the cap: a ferrous target's spectrum is nearly parallel to a magnetic
// soil's, so the unbounded least-squares k would take the target for soil
// and cancel it too. A ground reading logged beside the target at about the
// same coil height bounds the soil's share: the soil signal falls with the
// cube of the coil height (a half-space), so heights within ±25 % give k
// within 0.5-2.
func CancelGround(out, target, ground []Reading) (k float64) {
	if len(target) != len(ground) || len(out) != len(target) {
		panic("features: length mismatch")
	}
	var num, den float64
	for j := range target {
		// Re(conj(G)·T) in components is the plain dot product of (X, R).
		num += ground[j].X*target[j].X + ground[j].R*target[j].R
		den += ground[j].X*ground[j].X + ground[j].R*ground[j].R
	}
	if den > 0 && num > 0 {
		k = min(num/den, MaxGroundShare)
	}
	for j := range target {
		out[j] = Reading{Hz: target[j].Hz, X: target[j].X - k*ground[j].X, R: target[j].R - k*ground[j].R}
	}
	return k
}
