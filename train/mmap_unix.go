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
// point into it); unmap undoes it after a failed decode. changed tells
// whether the file has been written to since (its size or modification
// time): a file rewritten in place shows through the mapping. Replacing a
// model by renaming a new file over it, as train does, leaves a mapped one
// as it was.
func mapFile(f *os.File, size int) (data []byte, unmap func(), changed func() bool, err error) {
	var before syscall.Stat_t
	if err := syscall.Fstat(int(f.Fd()), &before); err != nil {
		return nil, nil, nil, err
	}
	// A descriptor of its own, open as long as the mapping, to ask.
	fd, err := syscall.Dup(int(f.Fd()))
	if err != nil {
		return nil, nil, nil, err
	}
	data, err = syscall.Mmap(int(f.Fd()), 0, size, syscall.PROT_READ|syscall.PROT_WRITE, syscall.MAP_PRIVATE)
	if err != nil {
		syscall.Close(fd)
		return nil, nil, nil, err
	}
	r := addrRange{uintptr(unsafe.Pointer(unsafe.SliceData(data))), uintptr(len(data))}
	mappings.Lock()
	mappings.ranges = append(mappings.ranges, r)
	mappings.Unlock()
	unmap = func() {
		mappings.Lock()
		mappings.ranges = slices.DeleteFunc(mappings.ranges, func(m addrRange) bool { return m == r })
		mappings.Unlock()
		syscall.Munmap(data)
		syscall.Close(fd)
	}
	changed = func() bool {
		var now syscall.Stat_t
		return syscall.Fstat(fd, &now) != nil || now.Size != before.Size || now.Mtim != before.Mtim
	}
	return data, unmap, changed, nil
}
