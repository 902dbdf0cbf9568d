package main

import (
	"fmt"
	"io"
	"runtime"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/render"
)

func newVersionCmd(g *globalOptions, st streams) *cobra.Command {
	var out output
	return &cobra.Command{
		Use:   "version",
		Short: "Print the lotproof version",
		Long: `version prints the lotproof version, the Go version it was built with and
the platform: one line, or with --format json or csv a record for scripts.`,
		Args: exactArgs(0, "no arguments"),
		RunE: withOutput(g, st, &out, func(args []string) error {
			if g.Format == "" { // not asked for: the one line, on a terminal or not
				out.Format = render.Text
			}
			return runVersion(out, st)
		}),
	}
}

// versionResult is the version as written with --format json.
type versionResult struct {
	Tool     string `json:"tool"`
	Version  string `json:"version"`
	Go       string `json:"go"`
	Platform string `json:"platform"`
}

func runVersion(o output, st streams) error {
	v := versionResult{Tool: "lotproof", Version: lots.Version, Go: runtime.Version(), Platform: runtime.GOOS + "/" + runtime.GOARCH}
	return emit(st.Out, func(w io.Writer) error {
		switch o.Format {
		case render.JSON:
			return render.WriteJSON(w, v)
		case render.CSV:
			t := render.NewTable("", "tool", "version", "go", "platform")
			t.Add(v.Tool, v.Version, v.Go, v.Platform)
			return t.WriteCSV(w)
		}
		_, err := fmt.Fprintf(w, "lotproof %s (%s, %s)\n", v.Version, v.Go, v.Platform)
		return err
	})
}
