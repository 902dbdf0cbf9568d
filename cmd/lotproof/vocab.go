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
		return render.WriteJSONArray(w, len(sum), func(i int) any { return &sum[i] })
	}
	const lotKey = `{"lot":`
	var failed error
	err := render.WriteJSONArray(w, len(sum), func(i int) any {
		var b bytes.Buffer
		enc := json.NewEncoder(&b)
		enc.SetEscapeHTML(false)
		if err := enc.Encode(sum[i]); err != nil {
			failed = err
			return nil
		}
		raw := bytes.TrimSpace(b.Bytes())
		if !bytes.HasPrefix(raw, []byte(lotKey)) {
			failed = fmt.Errorf("internal: summary JSON does not start with the group key: %.40s", raw)
			return nil
		}
		return json.RawMessage(append([]byte(`{"`+string(by)+`":`), raw[len(lotKey):]...))
	})
	if failed != nil {
		return failed
	}
	return err
}
