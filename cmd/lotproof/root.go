package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/render"
	"lotproof/lots/units"
)

// streams are the standard streams a command reads and writes, injected so
// that every run function can be tested without a terminal or cobra.
type streams struct {
	In          io.Reader
	Out, Err    io.Writer
	OutTerminal bool // stdout is a terminal (default format: table)
	ErrTerminal bool // stderr is a terminal (progress bars allowed)
}

// globalOptions are the flags every command shares.
type globalOptions struct {
	Format string // table, json, csv; empty: table on a terminal, csv otherwise
	Units  string // si or us
}

// output is the resolved output choice.
type output struct {
	Format render.Format
	System units.System
}

func (g globalOptions) resolve(st streams) (output, error) {
	var o output
	f := g.Format
	if f == "" {
		f = "csv"
		if st.OutTerminal {
			f = "table"
		}
	}
	var err error
	if o.Format, err = render.ParseFormat(f); err != nil {
		return o, usageError{err}
	}
	if o.System, err = units.ParseSystem(g.Units); err != nil {
		return o, usageError{err}
	}
	return o, nil
}

// usageError is a mistake on the command line (exit status 2).
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }
func (e usageError) Unwrap() error { return e.err }

// verdictError reports that a judgement went against the material (exit
// status 1); the results have already been written.
type verdictError struct{ msg string }

func (e verdictError) Error() string { return e.msg }

// Exit statuses (see DEVELOPERS.md).
const (
	exitOK      = 0
	exitVerdict = 1
	exitInput   = 2
)

// exitStatus maps an error to the process exit status.
func exitStatus(err error) int {
	if err == nil {
		return exitOK
	}
	var v verdictError
	if errors.As(err, &v) {
		return exitVerdict
	}
	return exitInput
}

// execute runs the command line args and returns the exit status.
func execute(args []string, st streams) int {
	root := newRootCmd(st)
	root.SetArgs(args)
	err := root.Execute()
	if err != nil {
		var v verdictError
		if errors.As(err, &v) {
			fmt.Fprintln(st.Err, "lotproof: "+v.msg)
		} else {
			fmt.Fprintln(st.Err, "lotproof: "+err.Error())
		}
	}
	return exitStatus(err)
}

func newRootCmd(st streams) *cobra.Command {
	g := &globalOptions{}
	root := &cobra.Command{
		Use:   "lotproof",
		Short: "Accept incoming lots, derive A- and B-basis design values, trend suppliers",
		Long: `lotproof reduces tensile records to properties, judges incoming lots against
their purchase specification with a stated confidence, derives one-sided
lower tolerance bounds (A- and B-basis) from multi-lot campaigns, and trends
supplier quality by quarter.

Statistical results support, and never replace, the governing
specification, regulations, local codes and licensed engineering judgement.`,
		SilenceUsage:  true,
		SilenceErrors: true,
		Version:       lots.Version,
	}
	root.SetIn(st.In)
	root.SetOut(st.Out)
	root.SetErr(st.Err)
	root.PersistentFlags().StringVar(&g.Format, "format", "", "output format: table, json or csv (default: table on a terminal, csv otherwise)")
	root.PersistentFlags().StringVar(&g.Units, "units", "si", "unit system for output: si or us")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error { return usageError{err} })
	root.AddCommand(
		newVersionCmd(g, st),
		newSummaryCmd(g, st),
		newDemoCmd(g, st),
	)
	for _, add := range extraCommands {
		root.AddCommand(add(g, st))
	}
	// cobra's completion command prints its help and exits 0 for a shell
	// it does not know: make that a usage error.
	root.InitDefaultCompletionCmd()
	if c, _, err := root.Find([]string{"completion"}); err == nil && c.Name() == "completion" {
		c.Args = cobra.ArbitraryArgs
		c.RunE = func(cmd *cobra.Command, args []string) error {
			var shells []string
			for _, s := range cmd.Commands() {
				shells = append(shells, s.Name())
			}
			if len(args) == 0 {
				return usageError{fmt.Errorf("completion needs a shell: %s", orList(shells))}
			}
			return usageError{fmt.Errorf("completion: unknown shell %q: expected %s", args[0], orList(shells))}
		}
	}
	return root
}

// extraCommands lets each command file register its constructor from an
// init function, so adding a command touches only its own file.
var extraCommands []func(*globalOptions, streams) *cobra.Command

func register(f func(*globalOptions, streams) *cobra.Command) {
	extraCommands = append(extraCommands, f)
}

// exactArgs is cobra.ExactArgs with a usage error (exit status 2).
func exactArgs(n int, what string) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if len(args) != n {
			return usageError{fmt.Errorf("%s expects %s (got %d arguments); see lotproof %s --help", cmd.Name(), what, len(args), cmd.Name())}
		}
		return nil
	}
}

// maxArgs accepts at most n positional arguments (a usage error otherwise).
func maxArgs(n int, what string) cobra.PositionalArgs {
	return func(cmd *cobra.Command, args []string) error {
		if len(args) > n {
			return usageError{fmt.Errorf("%s takes at most %s (got %d arguments)", cmd.Name(), what, len(args))}
		}
		return nil
	}
}

// withOutput resolves the global flags into *out, then runs run: the
// common start of every command that writes results.
func withOutput(g *globalOptions, st streams, out *output, run func(args []string) error) func(*cobra.Command, []string) error {
	return func(_ *cobra.Command, args []string) error {
		var err error
		if *out, err = g.resolve(st); err != nil {
			return err
		}
		return run(args)
	}
}
