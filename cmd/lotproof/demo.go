package main

import (
	"bytes"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/demo"
	"lotproof/lots/render"
)

type demoOptions struct {
	Out output
}

func newDemoCmd(g *globalOptions, st streams) *cobra.Command {
	var o demoOptions
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Run the whole job on the embedded, invented demo scenario",
		Long: `demo runs lotproof's pipeline on an invented scenario embedded in the binary:
Orrin Hollow Pumpworks receives steel bar and aluminium plate from five
invented mills over eight quarters, and qualifies a new plate gauge.
Every name and number in it is invented.`,
		Args: exactArgs(0, "no arguments"),
		RunE: func(cmd *cobra.Command, args []string) error {
			var err error
			if o.Out, err = g.resolve(st); err != nil {
				return err
			}
			return runDemo(o, st)
		},
	}
	return cmd
}

// demoResult is everything the demo computed, as written with --format json.
type demoResult struct {
	Scenario string              `json:"scenario"`
	Receipts []lots.GroupSummary `json:"receipts"`
}

func runDemo(o demoOptions, st streams) error {
	receipts, err := demoData("receipts.csv")
	if err != nil {
		return err
	}
	groups, err := receipts.Group(lots.ByLot, nil)
	if err != nil {
		return err
	}
	res := demoResult{
		Scenario: "Orrin Hollow Pumpworks (invented): steel bar and aluminium plate receipts 2025-Q1 to 2026-Q4",
		Receipts: lots.Summarize(receipts, groups, o.Out.System),
	}
	return emit(st.Out, func(w io.Writer) error {
		if o.Out.Format == render.JSON {
			return render.WriteJSON(w, res)
		}
		t := summaryTable("lot", res.Receipts)
		if o.Out.Format == render.Text {
			t.Title = fmt.Sprintf("Receipts: %d lots, %d specimens (%s)", len(groups), len(receipts.Specimens), res.Scenario)
		}
		return writeTables(w, o.Out.Format, t)
	})
}

// demoData reads one embedded results file.
func demoData(name string) (*lots.Dataset, error) {
	b, err := demo.Read(name)
	if err != nil {
		return nil, err
	}
	return lots.ReadCSV(bytes.NewReader(b), "demo/"+name)
}
