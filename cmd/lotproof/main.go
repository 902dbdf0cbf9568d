package main

import (
	"os"

	"golang.org/x/term"
)

func main() {
	st := streams{In: os.Stdin, Out: os.Stdout, Err: os.Stderr,
		OutTerminal: term.IsTerminal(int(os.Stdout.Fd())),
		ErrTerminal: term.IsTerminal(int(os.Stderr.Fd()))}
	os.Exit(execute(os.Args[1:], st))
}
