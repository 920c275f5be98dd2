//go:build unix

package train

import (
	"os"
	"slices"
	"syscall"
	"unsafe"
)

// mapFile maps a model file's first size bytes into memory, private and
// writable: nothing written there reaches the file, and a write by mistake
// copies a page rather than faulting. The kernel reads the pages as they
// are first touched, so a load reads only the sections it checks. The
// mapping is never undone once a bundle holds it (its arrays and strings
// point into it); unmap undoes it after a failed decode. A model file cut
// short by another program while it is mapped would fault: train replaces
// a model by renaming a new file over it, which leaves a mapped one whole.
func mapFile(f *os.File, size int) (data []byte, unmap func(), err error) {
	data, err = syscall.Mmap(int(f.Fd()), 0, size, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_PRIVATE)
	if err != nil {
		return nil, nil, err
	}
	r := addrRange{uintptr(unsafe.Pointer(unsafe.SliceData(data))), uintptr(len(data))}
	mappings.Lock()
	mappings.ranges = append(mappings.ranges, r)
	mappings.Unlock()
	return data, func() {
		mappings.Lock()
		mappings.ranges = slices.DeleteFunc(mappings.ranges, func(m addrRange) bool { return m == r })
		mappings.Unlock()
		syscall.Munmap(data)
	}, nil
}
