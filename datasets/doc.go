// Package datasets is spade's forward model of what buried targets read, the
// measurement model that turns a target into a dig-log row, and the embedded
// demo dig history generated with it.
//
// # Forward models
//
// Every target is described by its induced magnetic dipole moment per unit
// primary field, in m³, as a complex function of angular frequency, with the
// sign convention of the sphere formula (a lossy target has a negative
// imaginary part; spade's readings take X = Re, R = -Im):
//
//   - a conducting, permeable sphere, exact (Wait 1951; Ward & Hohmann 1988);
//   - a thin ring, one pole with τ = L/R and Grover's thin-ring inductance;
//   - a thin disc, as concentric rings coupled by Maxwell's mutual
//     inductance, which gives a sum of poles;
//   - soil: magnetic viscosity with log-uniform relaxation times, and saline
//     ground as a conductor at low induction number;
//   - composite objects as sums.
//
// # The demo
//
// The embedded history and readings are invented: two sites of our own (an
// iron-rich inland field and a tidal beach), an object catalogue of trash,
// keepers and possible ordnance, at frequencies of our choosing. Regenerating
// them with the same seed is byte-identical.
package datasets
