package demo

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
)

// Seed is the fixed seed of the embedded scenario. Generate(Seed) gives
// back the embedded files byte for byte (a test checks it).
const Seed = 20261294

// The invented scenario. Orrin Hollow Pumpworks (an invented maker of pump
// shafts and casings) buys quenched-and-tempered alloy steel bar to its
// specification OHP-MS-101 from three invented mills and heat-treated
// aluminium plate to OHP-MS-205 from two, over eight quarters (2025-Q1 to
// 2026-Q4). Every name here is invented.
type mill struct {
	code, name, material string
	lotsPerQuarter       int
	props                []propModel
}

type propModel struct {
	heading string  // column heading with unit
	mean    float64 // process mean
	within  float64 // within-lot SD
	between float64 // lot-to-lot SD of lot means
	dec     int     // decimals written
}

const (
	steel = "QT bar OH-S42"
	plate = "Plate OH-A61"
)

var steelProps = func(shift float64) []propModel {
	return []propModel{
		{"tensile [MPa]", 1010 + shift, 14, 6, 1},
		{"proof [MPa]", 880 + shift, 14, 6, 1},
		{"elongation [%]", 16, 0.8, 0.3, 1},
		{"reduction of area [%]", 55, 2.5, 1, 1},
		{"hardness [HBW]", 300 + shift/3.4, 5, 2, 0},
	}
}

var plateProps = []propModel{
	{"tensile [MPa]", 318, 4, 2, 1},
	{"proof [MPa]", 278, 4, 2, 1},
	{"elongation [%]", 12.5, 0.9, 0.4, 1},
	{"reduction of area [%]", math.NaN(), 0, 0, 1}, // not measured on plate
	{"hardness [HBW]", 96, 2, 1, 0},
}

var mills = []mill{
	{"BW", "Brackwater Steel", steel, 2, nil},
	{"CF", "Coldmere Forge", steel, 2, nil},
	{"SR", "Sallow Ridge Mills", steel, 2, nil},
	{"LF", "Lumen Flats Aluminium", plate, 1, nil},
	{"QB", "Quillbrook Rolling", plate, 1, nil},
}

// Quarters of the receipts history.
var quarters = []string{"2025-Q1", "2025-Q2", "2025-Q3", "2025-Q4", "2026-Q1", "2026-Q2", "2026-Q3", "2026-Q4"}

// DriftStart is the quarter in which Coldmere Forge's strength starts to
// drift downward; DriftPerQuarter is the drop of its tensile and proof
// strength means per quarter from then on (MPa).
const (
	DriftMill       = "Coldmere Forge"
	DriftStart      = "2026-Q2"
	DriftPerQuarter = 30.0
	BadLot          = "SR-2503-2" // a lot rolled with a low temper: tensile and proof well below the minimum
	OutlierSpecimen = "BW-2504-1-5"
)

// Generate makes the scenario's data files from a seed.
func Generate(seed uint64) map[string][]byte {
	rng := rand.New(rand.NewPCG(seed, 0x6c6f7470726f6f66))
	files := map[string][]byte{
		"receipts.csv": receipts(rng),
		"campaign.csv": campaign(rng),
	}
	for name, b := range rawRecords(seed) {
		files[name] = b
	}
	files["raw-hardness.csv"] = rawHardness(seed)
	return files
}

func quarterStart(q string) (year, month int) {
	y, _ := strconv.Atoi(q[:4])
	n := int(q[6] - '0')
	return y, 3*(n-1) + 1
}

func receipts(rng *rand.Rand) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := []string{"specimen", "lot", "heat", "supplier", "material", "tested", "condition"}
	for _, p := range steelProps(0) {
		head = append(head, p.heading)
	}
	w.Write(head)
	driftFrom := -1
	for i, q := range quarters {
		if q == DriftStart {
			driftFrom = i
		}
	}
	for qi, q := range quarters {
		year, month := quarterStart(q)
		for mi, m := range mills {
			props := plateProps
			if m.material == steel {
				shift := 0.0
				if m.name == DriftMill && qi >= driftFrom {
					shift = -DriftPerQuarter * float64(qi-driftFrom+1)
				}
				props = steelProps(shift)
			}
			heat := fmt.Sprintf("%s-H%02d%d%02d", m.code, year%100, month/3+1, 40+mi*7+qi)
			for l := 1; l <= m.lotsPerQuarter; l++ {
				lot := fmt.Sprintf("%s-%02d%02d-%d", m.code, year%100, qi%4+1, l)
				day := 3 + rng.IntN(80)
				tested := fmt.Sprintf("%04d-%02d-%02d", year, month+day/28, 1+day%28)
				lotMeans := make([]float64, len(props))
				for pi, p := range props {
					lotMeans[pi] = p.mean + p.between*rng.NormFloat64()
					if lot == BadLot && pi < 2 {
						lotMeans[pi] -= 105
					}
				}
				for s := 1; s <= 5; s++ {
					id := fmt.Sprintf("%s-%d", lot, s)
					row := []string{id, lot, heat, m.name, m.material, tested, "RT"}
					for pi, p := range props {
						v := lotMeans[pi] + p.within*rng.NormFloat64()
						if id == OutlierSpecimen && pi == 0 {
							v = lotMeans[pi] - 150 // a specimen with a machining flaw
						}
						row = append(row, cell(v, p.dec))
					}
					w.Write(row)
				}
			}
		}
	}
	w.Flush()
	return b.Bytes()
}

// The qualification campaign: Quillbrook Rolling's plate in a new, thicker
// gauge (invented), ten lots, four specimens per lot at room temperature
// and four at 120 C.
const (
	CampaignSupplier = "Quillbrook Rolling"
	CampaignMaterial = "Plate OH-A61 thick"
)

func campaign(rng *rand.Rand) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	w.Write([]string{"specimen", "lot", "heat", "supplier", "material", "tested", "condition", "tensile [MPa]", "proof [MPa]", "elongation [%]"})
	type cond struct {
		name  string
		scale float64
	}
	conds := []cond{{"RT", 1}, {"120C", 0.88}}
	for l := 1; l <= 10; l++ {
		lot := fmt.Sprintf("QB-Q%02d", l)
		heat := fmt.Sprintf("QB-QH%02d", (l+1)/2)
		// Tensile has a clear lot-to-lot effect, proof strength little.
		tLot := 3.2 * rng.NormFloat64() * 3
		pLot := 1.0 * rng.NormFloat64()
		eLot := 0.3 * rng.NormFloat64()
		for _, c := range conds {
			for s := 1; s <= 4; s++ {
				id := fmt.Sprintf("%s-%s-%d", lot, c.name, s)
				tested := fmt.Sprintf("2026-%02d-%02d", 4+l/4, 2+2*l)
				t := c.scale * (312 + tLot + 4*rng.NormFloat64())
				p := c.scale * (271 + pLot + 4.5*rng.NormFloat64())
				e := 12 + eLot + 0.9*rng.NormFloat64()
				if c.name == "120C" {
					e += 2
				}
				w.Write([]string{id, lot, heat, CampaignSupplier, CampaignMaterial, tested, c.name, cell(t, 1), cell(p, 1), cell(e, 1)})
			}
		}
	}
	w.Flush()
	return b.Bytes()
}

func cell(v float64, dec int) string {
	if math.IsNaN(v) {
		return ""
	}
	return strconv.FormatFloat(v, 'f', dec, 64)
}
