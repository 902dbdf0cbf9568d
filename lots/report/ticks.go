package report

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// plainTicks labels a numeric axis with at least three labelled ticks at
// round values (1, 2 or 5 times a power of ten), written without trailing
// zeros ("0.5", not "0.50"). gonum's default marker can leave a short
// axis with two labels.
type plainTicks struct{}

func (plainTicks) Ticks(min, max float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(min, max)
	labelled := 0
	for _, t := range ts {
		if t.Label != "" {
			labelled++
		}
	}
	if labelled < 3 && max > min {
		ts = roundTicks(min, max, 5)
	}
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = tickLabel(ts[i].Value)
		}
	}
	return ts
}

// roundTicks puts about want labelled ticks at multiples of a round step.
func roundTicks(min, max float64, want int) []plot.Tick {
	raw := (max - min) / float64(want)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	var ts []plot.Tick
	for v := math.Ceil(min/step) * step; v <= max+step*1e-9; v += step {
		if math.Abs(v) < step*1e-9 {
			v = 0
		}
		ts = append(ts, plot.Tick{Value: v, Label: "x"})
	}
	return ts
}

// tickLabel writes a tick value in its shortest form, without exponent
// for ordinary magnitudes and without rounding noise.
func tickLabel(v float64) string {
	r, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
	if err != nil {
		r = v
	}
	a := math.Abs(r)
	if a != 0 && (a < 1e-4 || a >= 1e7) {
		return strconv.FormatFloat(r, 'g', -1, 64)
	}
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// logPercentTicks labels a logarithmic percent axis at the powers of ten
// (with unlabelled 2 and 5 between them).
type logPercentTicks struct{}

func (logPercentTicks) Ticks(min, max float64) []plot.Tick {
	var ts []plot.Tick
	for e := math.Floor(math.Log10(min)); e <= math.Ceil(math.Log10(max)); e++ {
		for _, m := range []float64{1, 2, 5} {
			v := m * math.Pow(10, e)
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 {
				t.Label = tickLabel(v)
			}
			ts = append(ts, t)
		}
	}
	return ts
}
