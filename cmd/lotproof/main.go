package main

import (
	"os"
	"os/signal"
	"runtime/debug"
	"runtime/pprof"
	"syscall"
	"time"

	"golang.org/x/term"

	"lotproof/lots/input"
)

func main() {
	cleanupOnSignal()
	st := streams{In: os.Stdin, Out: os.Stdout, Err: os.Stderr,
		OutTerminal: term.IsTerminal(int(os.Stdout.Fd())),
		ErrTerminal: term.IsTerminal(int(os.Stderr.Fd()))}
	stop := profileCPU(os.Getenv("LOTPROOF_CPUPROFILE"))
	code := execute(os.Args[1:], st)
	stop()
	profileMemory(os.Getenv("LOTPROOF_MEMPROFILE"))
	os.Exit(code)
}

// profileMemory writes the allocation profile of the command to the file
// named (for developers: go tool pprof -sample_index=alloc_space).
// Nothing when name is empty or the file cannot be made.
func profileMemory(name string) {
	if name == "" {
		return
	}
	if f, err := os.Create(name); err == nil {
		pprof.Lookup("allocs").WriteTo(f, 0)
		f.Close()
	}
}

// profileCPU writes a CPU profile of the command to the file named (for
// developers: go tool pprof); stop ends it. Nothing when name is empty or
// the file cannot be made.
func profileCPU(name string) (stop func()) {
	if name == "" {
		return func() {}
	}
	f, err := os.Create(name)
	if err != nil {
		return func() {}
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		return func() {}
	}
	return func() { pprof.StopCPUProfile(); f.Close() }
}

// streamingGC lets the heap grow to three times what is live between
// collections (Go's default is twice), unless GOGC says otherwise, for a
// command that reads a large file one lot at a time and so keeps little
// live: it costs a few tens of MiB and saves about a tenth of the CPU time
// of accept on a year of receipts (the scale benchmarks). Commands that
// hold a whole dataset keep the default. The returned function restores
// the setting.
func streamingGC() (restore func()) {
	if os.Getenv("GOGC") != "" {
		return func() {}
	}
	prev := debug.SetGCPercent(200)
	return func() { debug.SetGCPercent(prev) }
}

// cleanupOnSignal removes the temporary files of a read in progress (an
// xlsx workbook's unpacked sheets) when the command is interrupted
// (SIGINT, Ctrl-C) or terminated (SIGTERM), then ends the process by the
// same signal so that the caller sees the usual status. Output is written
// only at the end (emit) and database imports are one transaction, so
// nothing partial stays behind.
func cleanupOnSignal() {
	c := make(chan os.Signal, 1)
	signal.Notify(c, os.Interrupt, syscall.SIGTERM)
	go func() {
		s := <-c
		input.RemoveTemps()
		signal.Reset(os.Interrupt, syscall.SIGTERM)
		if p, err := os.FindProcess(os.Getpid()); err == nil {
			p.Signal(s)
		}
		time.Sleep(time.Second)
		os.Exit(128 + int(s.(syscall.Signal)))
	}()
}
