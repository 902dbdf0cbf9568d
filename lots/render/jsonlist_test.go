package render

import (
	"bytes"
	"testing"
)

// TestWriteJSONListSameAsWriteJSON: the list written element by element
// gives the bytes encoding/json gives for the whole value (the reference),
// for lists of 0, 1 and 3 elements holding nested values, HTML characters
// and a key that also appears inside the elements.
func TestWriteJSONListSameAsWriteJSON(t *testing.T) {
	type item struct {
		Lot    string             `json:"lot"`
		Values []float64          `json:"values"`
		Sub    map[string]float64 `json:"sub"`
		Lots   []string           `json:"lots"`
	}
	type whole struct {
		Source string   `json:"source"`
		Lots   []item   `json:"lots"`
		Notes  []string `json:"notes"`
	}
	all := []item{
		{Lot: "A<1>&", Values: []float64{1, 2.5}, Sub: map[string]float64{"x": 1}, Lots: []string{"inner"}},
		{Lot: "B", Values: nil, Sub: nil},
		{Lot: "C \"q\"", Values: []float64{-0.125}, Lots: []string{}},
	}
	for _, n := range []int{0, 1, 3} {
		v := whole{Source: "s.csv", Lots: all[:n], Notes: []string{"a", "b"}}
		var want, got bytes.Buffer
		if err := WriteJSON(&want, v); err != nil {
			t.Fatal(err)
		}
		head := v
		head.Lots = nil
		if err := WriteJSONList(&got, head, "lots", n, func(i int) any { return v.Lots[i] }); err != nil {
			t.Fatal(err)
		}
		if got.String() != want.String() {
			t.Errorf("%d elements:\ngot  %s\nwant %s", n, got.String(), want.String())
		}
	}
	// A list left out when empty (omitempty): the head holds a
	// placeholder element.
	type sparse struct {
		Source string   `json:"source"`
		Lots   []item   `json:"lots,omitempty"`
		Notes  []string `json:"notes"`
	}
	for _, n := range []int{1, 3} {
		v := sparse{Source: "s.csv", Lots: all[:n], Notes: []string{"a"}}
		var want, got bytes.Buffer
		if err := WriteJSON(&want, v); err != nil {
			t.Fatal(err)
		}
		head := v
		head.Lots = []item{{Lot: "placeholder", Values: []float64{1}, Lots: []string{"x"}}}
		if err := WriteJSONList(&got, head, "lots", n, func(i int) any { return v.Lots[i] }); err != nil {
			t.Fatal(err)
		}
		if got.String() != want.String() {
			t.Errorf("omitempty, %d elements:\ngot  %s\nwant %s", n, got.String(), want.String())
		}
	}
	var b bytes.Buffer
	if err := WriteJSONList(&b, whole{Lots: all}, "items", 3, func(i int) any { return all[i] }); err == nil {
		t.Error("a head without the member: no error")
	}
}

// TestWriteJSONArraySameAsWriteJSON: a top-level list written element by
// element gives encoding/json's bytes for the whole list (0, 1, 3 elements).
func TestWriteJSONArraySameAsWriteJSON(t *testing.T) {
	type item struct {
		Lot  string    `json:"lot"`
		Vals []float64 `json:"values"`
	}
	all := []item{{"A<&>", []float64{1, 2}}, {"B", nil}, {"C", []float64{}}}
	for _, n := range []int{0, 1, 3} {
		var want, got bytes.Buffer
		if err := WriteJSON(&want, all[:n]); err != nil {
			t.Fatal(err)
		}
		if err := WriteJSONArray(&got, n, func(i int) any { return all[i] }); err != nil {
			t.Fatal(err)
		}
		if got.String() != want.String() {
			t.Errorf("%d elements:\ngot  %q\nwant %q", n, got.String(), want.String())
		}
	}
}
