// Package plots draws spade's pictures with gonum.org/v1/plot, as PNG or SVG:
// class shares per ID bin with the entropy and the ambiguous ranges, the
// reliability diagram, the confusion matrix as a heat map, and per-class
// phase spectra.
//
// Colours are chosen so that readers with the common colour-vision
// deficiencies can tell the classes apart: Okabe & Ito's "Color Universal
// Design" palette (2008) for lines, Paul Tol's "muted" scheme (2021) for the
// class bars, where hazards and keepers get colours first and trash beyond
// ten classes is drawn as "other trash" in grey. The heat map uses one hue,
// light to dark. Axes carry
// units, and every title says what the picture answers.
package plots
