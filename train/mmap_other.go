//go:build !unix

package train

import (
	"errors"
	"os"
)

// mapFile is not available here: the loader reads the file instead.
func mapFile(*os.File, int) ([]byte, func(), error) { return nil, nil, errors.ErrUnsupported }
