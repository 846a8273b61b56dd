//go:build unix

package analysis

import (
	"syscall"
	"time"
)

// cpuTime is the process's user and system CPU time. On a shared machine it measures the work a
// benchmark does, where wall-clock time also counts the waits for a core.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
