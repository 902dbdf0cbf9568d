// Package rss reads the process's peak resident set size, for the
// benchmarks that report memory.
package rss

import (
	"os"
	"strconv"
	"strings"
)

// PeakMB is the peak resident set size of this process in MiB (VmHWM from
// /proc/self/status, Linux), or -1 where it cannot be read.
func PeakMB() float64 {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return -1
	}
	for _, line := range strings.Split(string(b), "\n") {
		if strings.HasPrefix(line, "VmHWM:") {
			f := strings.Fields(line)
			kb, _ := strconv.ParseFloat(f[1], 64)
			return kb / 1024
		}
	}
	return -1
}

// ResetPeak starts the peak over from the current resident set size
// (writes 5 to /proc/self/clear_refs, Linux 4.0 and later), so that a
// benchmark can report the peak of its own work. It reports whether that
// worked.
func ResetPeak() bool {
	return os.WriteFile("/proc/self/clear_refs", []byte("5"), 0) == nil
}
