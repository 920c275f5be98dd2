package plots

import (
	"hash/fnv"
	"image/color"
	"slices"
	"sort"
)

// classPalette holds the colours a class may get: Paul Tol's "muted"
// qualitative scheme without its two reds (rose, wine), which could be
// taken for the hazard colour, Okabe & Ito's orange, blue and yellow,
// black, and ColorBrewer's dark brown (Tol, "Colour Schemes",
// SRON/EPS/TN/09-002, 2021; Okabe & Ito, "Color Universal Design", 2008;
// Brewer, colorbrewer2.org, BrBG; the hex values from memory). Twelve, so
// that a history of a dozen kinds of find draws each in its own colour;
// no twelve colours all stay apart under every colour-vision deficiency,
// so the pictures name classes in their legends and titles too.
var classPalette = []color.Color{
	color.RGBA{0x33, 0x22, 0x88, 0xFF}, // indigo
	color.RGBA{0x88, 0xCC, 0xEE, 0xFF}, // cyan
	color.RGBA{0x44, 0xAA, 0x99, 0xFF}, // teal
	color.RGBA{0x11, 0x77, 0x33, 0xFF}, // green
	color.RGBA{0x99, 0x99, 0x33, 0xFF}, // olive
	color.RGBA{0xDD, 0xCC, 0x77, 0xFF}, // sand
	color.RGBA{0xAA, 0x44, 0x99, 0xFF}, // purple
	color.RGBA{0xE6, 0x9F, 0x00, 0xFF}, // orange (Okabe-Ito)
	color.RGBA{0x00, 0x72, 0xB2, 0xFF}, // blue (Okabe-Ito)
	color.RGBA{0x00, 0x00, 0x00, 0xFF}, // black
	color.RGBA{0xF0, 0xE4, 0x42, 0xFF}, // yellow (Okabe-Ito)
	color.RGBA{0x8C, 0x51, 0x0A, 0xFF}, // dark brown (ColorBrewer BrBG)
}

// hazardRed is reserved for hazard classes (possible ordnance) in every
// picture, and no other class ever gets it: Tol's "vibrant" red.
var hazardRed = color.RGBA{0xCC, 0x33, 0x11, 0xFF}

// otherGrey is the classes a picture has no colour left for.
var otherGrey = color.RGBA{0xBB, 0xBB, 0xBB, 0xFF}

// Roles are the classes a picture marks: the user's keepers and the
// hazards, never to be dug.
type Roles struct {
	Keepers, Hazards []string
}

// colourHome is where a class's colour is looked for first: its name's
// FNV-1a hash in the palette, so that a class keeps its colour from run to
// run and from log to log.
func colourHome(class string) int {
	h := fnv.New32a()
	h.Write([]byte(class))
	return int(h.Sum32() % uint32(len(classPalette)))
}

// ClassColours gives the classes of one picture their colours. Hazards
// get the reserved red. The others are named in order of importance (the
// keepers, then the commonest of the rest by count) while the palette
// lasts, and each takes its home colour (colourHome) unless a class named
// before it in the same picture took it first, then the next free one:
// the same class has the same colour in every picture and every log but
// where two of them meet on one home. Classes left without a colour are
// absent from the map: draw them as one "other" in grey.
func ClassColours(counts map[string]int, roles Roles) map[string]color.Color {
	colours := map[string]color.Color{}
	var named []string
	for c := range counts {
		if slices.Contains(roles.Hazards, c) {
			colours[c] = hazardRed
		} else {
			named = append(named, c)
		}
	}
	sort.Slice(named, func(i, j int) bool {
		ki, kj := slices.Contains(roles.Keepers, named[i]), slices.Contains(roles.Keepers, named[j])
		if ki != kj {
			return ki
		}
		if counts[named[i]] != counts[named[j]] {
			return counts[named[i]] > counts[named[j]]
		}
		return named[i] < named[j]
	})
	taken := make([]bool, len(classPalette))
	for _, c := range named[:min(len(named), len(classPalette))] {
		slot := colourHome(c)
		for taken[slot] {
			slot = (slot + 1) % len(classPalette)
		}
		taken[slot] = true
		colours[c] = classPalette[slot]
	}
	return colours
}
