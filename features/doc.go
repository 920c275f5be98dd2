// Package features reads dig logs and turns multi-frequency phase and
// amplitude readings into the feature vectors spade's classifier learns from.
//
// # The dig log
//
// A dig log is CSV (RFC 4180, one header row, '#' comments) or JSON Lines, as
// specified in the project's dig-log contract and summarised in the README.
// Each row is one target: readings at a fixed set of frequencies, optional
// ground readings, and, for training, the material and shape that came out of
// the ground.
//
//	dig,material,shape,phase_5000,amp_5000,phase_20000,amp_20000
//	a1,gold,ring,128.4,0.91,151.0,1.12
//
// Every rejected value is a *ParseError naming file, line, column and reason,
// with a sentinel cause that callers test with errors.Is.
//
// # Phase convention
//
// 0° is a purely magnetic, non-conducting response, a weak conductor at low
// induction number sits near 90°, a perfect conductor at 180°. In components,
// phase = atan2(R, X) and amplitude = hypot(X, R), with X > 0 for a magnetic
// response and R >= 0 for a passive, lossy target.
//
// # Features
//
// A FeatureSpec fixes the frequencies and the names and order of the features.
// Extract cancels the ground (when the row carries a ground reading), fits the
// single-pole-plus-ferrous target model by variable projection, and writes
// the vector. Training and classification share one spec, so a model refuses
// readings taken at other frequencies.
package features
