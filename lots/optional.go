package lots

import (
	"encoding/json"
	"strings"
)

// Text is a string written to JSON as null when it is empty (an option
// that was not given, such as no --since date).
type Text string

// MarshalJSON writes null for the empty string.
func (t Text) MarshalJSON() ([]byte, error) {
	if t == "" {
		return []byte("null"), nil
	}
	return marshalString(string(t))
}

func marshalString(s string) ([]byte, error) {
	var b strings.Builder
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(s); err != nil {
		return nil, err
	}
	return []byte(strings.TrimSuffix(b.String(), "\n")), nil
}
