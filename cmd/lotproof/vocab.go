package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"

	"lotproof/lots"
	"lotproof/lots/render"
)

// summaryJSON writes the summary with each group's key named after the
// grouping: "lot", or "heat" with --group-by heat.
func summaryJSON(w io.Writer, by lots.GroupBy, sum []lots.GroupSummary) error {
	var failed error
	err := render.WriteJSONArray(w, len(sum), func(i int) any {
		v, err := summaryItem(by, &sum[i])
		if err != nil {
			failed = err
		}
		return v
	})
	if failed != nil {
		return failed
	}
	return err
}

// summaryItem is a group's summary as JSON encodes it, its key named by
// the grouping ("lot" or "heat").
func summaryItem(by lots.GroupBy, g *lots.GroupSummary) (any, error) {
	if by == lots.ByLot {
		return g, nil
	}
	const lotKey = `{"lot":`
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(g); err != nil {
		return nil, err
	}
	raw := bytes.TrimSpace(b.Bytes())
	if !bytes.HasPrefix(raw, []byte(lotKey)) {
		return nil, fmt.Errorf("internal: summary JSON does not start with the group key: %.40s", raw)
	}
	return json.RawMessage(append([]byte(`{"`+string(by)+`":`), raw[len(lotKey):]...)), nil
}
