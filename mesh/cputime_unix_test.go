//go:build unix

package mesh

import (
	"syscall"
	"time"
)

// cpuTime is the user and system CPU time of this process (who = syscall.RUSAGE_SELF) or of
// its finished children (RUSAGE_CHILDREN). On a shared machine it measures the work a
// benchmark does, where wall-clock time also counts the waits for a core.
func cpuTime(who int) time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(who, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

const (
	cpuSelf     = syscall.RUSAGE_SELF
	cpuChildren = syscall.RUSAGE_CHILDREN
)
