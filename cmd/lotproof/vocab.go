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
	if by == lots.ByLot {
		return render.WriteJSON(w, sum)
	}
	const lotKey = `{"lot":`
	out := make([]json.RawMessage, len(sum))
	for i, g := range sum {
		var b bytes.Buffer
		enc := json.NewEncoder(&b)
		enc.SetEscapeHTML(false)
		if err := enc.Encode(g); err != nil {
			return err
		}
		raw := bytes.TrimSpace(b.Bytes())
		if !bytes.HasPrefix(raw, []byte(lotKey)) {
			return fmt.Errorf("internal: summary JSON does not start with the group key: %.40s", raw)
		}
		out[i] = append([]byte(`{"`+string(by)+`":`), raw[len(lotKey):]...)
	}
	return render.WriteJSON(w, out)
}
