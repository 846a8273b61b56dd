package volume

import (
	"bufio"
	"fmt"
	"os"
	"strconv"
	"strings"
)

// MaxVoxels bounds any volume read (4 G voxels, 8 GB of stored values).
const MaxVoxels = 1 << 32

// BytesPerVoxel is what a loaded volume keeps per voxel.
const BytesPerVoxel = 2

// workFactor: a volume is loaded once and its stored values are the only full copy; readers
// hold at most one more (a multi-frame file's raw pixel data), segmentation works on a box
// around the canal. Room for twice the volume is asked for.
const workFactor = 2

// availableMemory is the memory the system can give without swapping (MemAvailable), or 0
// when it cannot tell.
func availableMemory() int64 {
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return 0
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "MemAvailable:") {
			fs := strings.Fields(line)
			if len(fs) >= 2 {
				kb, err := strconv.ParseInt(fs[1], 10, 64)
				if err == nil {
					return kb * 1024
				}
			}
		}
	}
	return 0
}

// checkFits refuses a volume that would not fit, before anything is allocated.
func checkFits(name string, nx, ny, nz int, limit int64) error {
	if nx <= 0 || ny <= 0 || nz <= 0 {
		return fmt.Errorf("%s: %d x %d x %d voxels: every dimension must be at least 1", name, nx, ny, nz)
	}
	n := float64(nx) * float64(ny) * float64(nz)
	if n > MaxVoxels {
		return fmt.Errorf("%s: %d x %d x %d voxels is more than this program reads (%d); crop the scan to the tooth", name, nx, ny, nz, int64(MaxVoxels))
	}
	need := int64(n) * BytesPerVoxel * workFactor
	if limit == 0 {
		limit = availableMemory()
	}
	if limit > 0 && need > limit {
		return fmt.Errorf("%s: %d x %d x %d voxels need about %s of memory and %s is free; crop the scan to the tooth or free memory",
			name, nx, ny, nz, sizeText(need), sizeText(limit))
	}
	return nil
}

func sizeText(b int64) string {
	switch {
	case b >= 1<<30:
		return fmt.Sprintf("%.1f GB", float64(b)/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%.0f MB", float64(b)/(1<<20))
	}
	return fmt.Sprintf("%d kB", b>>10)
}
