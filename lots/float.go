package lots

import (
	"math"
	"strconv"
)

// Float is a float64 that is written to JSON as a plain number, and as
// null when it is NaN or infinite (a value that does not exist, such as the
// standard deviation of one value).
type Float float64

// MarshalJSON writes null for NaN and infinities.
func (f Float) MarshalJSON() ([]byte, error) {
	v := float64(f)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

// NaN is a Float that is missing.
var NaN = Float(math.NaN())
