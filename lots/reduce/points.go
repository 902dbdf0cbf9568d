package reduce

import "math"

// chunkBits sets the chunk size of points: 2^14 points per chunk.
const chunkBits = 14

// points holds the data points of a record in chunks of float32 force [N],
// float32 strain and int32 line number: 12 bytes a point, and no copying
// as the record grows (a 10,000,000-point record holds 120 MB).
//
// float32 keeps 24 significant bits, a relative rounding error of at most
// 6e-8. The standards ask far less of the measurement itself: force
// indicators of ISO 7500-1 class 0.5 or 1 (0.5 % or 1 % of the reading)
// and extensometers of ISO 9513 class 0.5 or 1 (0.5 % or 1 % of the
// reading, or 1.5 um); ASTM E4 and E83 set like limits. A strain of 0.002
// is held to 1.2e-10, a hundred times finer than 1 um of extension on a
// 50 mm gauge length (2e-8), so float32 storage loses nothing the test can
// resolve. The arithmetic after reading is in float64.
type points struct {
	n    int
	f, x [][]float32
	ln   [][]int32
}

func (p *points) add(f, x float64, line int) {
	c := p.n >> chunkBits
	if c == len(p.f) {
		size := 1 << chunkBits
		if c == 0 {
			size = 256 // small records stay small
		}
		p.f = append(p.f, make([]float32, 0, size))
		p.x = append(p.x, make([]float32, 0, size))
		p.ln = append(p.ln, make([]int32, 0, size))
	}
	if line > math.MaxInt32 {
		line = math.MaxInt32
	}
	p.f[c] = append(p.f[c], float32(f))
	p.x[c] = append(p.x[c], float32(x))
	p.ln[c] = append(p.ln[c], int32(line))
	p.n++
}

func (p *points) at(i int) (f, x float64, line int) {
	c, k := i>>chunkBits, i&(1<<chunkBits-1)
	return float64(p.f[c][k]), float64(p.x[c][k]), int(p.ln[c][k])
}

// Len returns the number of data points of the record.
func (r *Record) Len() int { return r.pts.n }

// Point returns data point i (0-based, file order): force [N], strain and
// the file line it was read from.
func (r *Record) Point(i int) (force, strain float64, line int) { return r.pts.at(i) }

// Add appends a data point: force [N], strain and its file line (for
// records built in code; Parse fills records itself). Values are held as
// float32 (see points).
func (r *Record) Add(force, strain float64, line int) { r.pts.add(force, strain, line) }
