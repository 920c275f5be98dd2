//go:build !unix

package train

import (
	"errors"
	"os"
)

// mapFile is not available here: the loader reads the file instead.
func mapFile(*os.File, int) ([]byte, func(), func() bool, error) {
	return nil, nil, nil, errors.ErrUnsupported
}
