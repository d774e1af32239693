//go:build unix

package orbits

import "syscall"

// processCPUSeconds returns the user+system CPU time of the process, so
// benchmarks can report a rate per CPU-second that is less sensitive to
// other load on a shared machine than the wall-clock rate.
func processCPUSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)/1e6
}
