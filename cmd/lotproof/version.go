package main

import (
	"fmt"
	"runtime"

	"github.com/spf13/cobra"

	"lotproof/lots"
)

func newVersionCmd(st streams) *cobra.Command {
	return &cobra.Command{
		Use:   "version",
		Short: "Print the lotproof version",
		Args:  exactArgs(0, "no arguments"),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runVersion(st)
		},
	}
}

func runVersion(st streams) error {
	_, err := fmt.Fprintf(st.Out, "lotproof %s (%s, %s/%s)\n", lots.Version, runtime.Version(), runtime.GOOS, runtime.GOARCH)
	return err
}
