package lots

import (
	"errors"
	"io"

	"lotproof/lots/input"
)

// fromInput turns a problem found by package input (a refused or oversized
// file) into a one-problem *InputError; other errors pass unchanged.
func fromInput(err error) error {
	var ie *input.Error
	if errors.As(err, &ie) {
		return &InputError{Problems: []Problem{{Where: ie.Where, What: ie.What, Fix: ie.Fix}}}
	}
	return err
}

// OpenInput opens a file the user named (or standard input for "-") as
// the kind of input k, through package input: regular files only, within
// the kind's cap. Problems come back as *InputError.
func OpenInput(name string, k input.Kind, stdin io.Reader) (io.ReadCloser, error) {
	r, err := input.Open(name, k, stdin)
	return r, fromInput(err)
}

// ReadInput reads the whole of a file the user named as the kind of
// input k (see OpenInput).
func ReadInput(name string, k input.Kind, stdin io.Reader) ([]byte, error) {
	b, err := input.ReadAll(name, k, stdin)
	return b, fromInput(err)
}
