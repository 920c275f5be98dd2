package overlap

import (
	"errors"
	"fmt"
	"strings"

	"github.com/spade-detect/spade/features"
)

// ErrAxis is Axis's refusal of an axis the log does not have.
var ErrAxis = errors.New("no axis")

// Axis is the single number each dig of log is binned by: "display_id",
// or "phase_<hz>" (any of the log's frequencies, in the log's forms: 10k,
// 10000) for the phase as the instrument gave it, the number a user sees.
// An empty by means the display ID when every dig has one, else the phase
// at the middle frequency. It returns the values, the axis's canonical name
// and its unit for a plot.
func Axis(log *features.Log, by string) (axis []float64, name, unit string, err error) {
	if by == "" {
		by = "display_id"
		if !log.HasDisplayID {
			by = fmt.Sprintf("phase_%d", log.Freqs[len(log.Freqs)/2])
		}
	}
	axis = make([]float64, len(log.Digs))
	switch {
	case by == "display_id":
		if !log.HasDisplayID {
			return nil, "", "", fmt.Errorf("%w %q: the log has no display_id column (or some rows lack it); use phase_<hz>", ErrAxis, by)
		}
		for i := range log.Digs {
			axis[i] = log.Digs[i].DisplayID
		}
		return axis, by, "display ID", nil
	case strings.HasPrefix(by, "phase_"):
		hz, err := features.ParseHz(strings.TrimPrefix(by, "phase_"))
		j := -1
		for k, f := range log.Freqs {
			if f == hz {
				j = k
			}
		}
		if err != nil || j < 0 {
			return nil, "", "", fmt.Errorf("%w %q: the log's frequencies are %s", ErrAxis, by, features.HzList(log.Freqs))
		}
		for i := range log.Digs {
			axis[i] = log.Digs[i].Readings[j].Phase()
		}
		return axis, fmt.Sprintf("phase_%d", hz), fmt.Sprintf("phase at %d Hz (degrees)", hz), nil
	}
	return nil, "", "", fmt.Errorf("%w %q: want display_id or phase_<hz>", ErrAxis, by)
}
