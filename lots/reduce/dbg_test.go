package reduce

import (
	"fmt"
	"os"
	"strconv"
	"testing"
)

func TestDbg(t *testing.T) {
	pts, _ := strconv.Atoi(os.Getenv("P"))
	nz, _ := strconv.ParseFloat(os.Getenv("N"), 64)
	seeds, _ := strconv.Atoi(os.Getenv("S"))
	for _, mt := range roMaterials {
		for seed := 1; seed <= seeds; seed++ {
			sp := mt.spec(pts, nz, uint64(seed))
			var row errRow
			r := reduceErrors(t, sp, &row)
			fmt.Printf("%-16s s%d E %6.3f Rp %6.3f Rm %6.3f Ag %6.3f A %6.3f | fit %.0f-%.0f MPa (%.1f-%.1f%%Rp) n=%d curve? %s | noise %.3g raw %.3g | %s\n", mt.name, seed, row.E, row.Rp, row.Rm, row.Ag, row.A,
				r.Fit.From, r.Fit.To, r.Fit.FromPercentProof, r.Fit.ToPercentProof, r.Fit.N, r.FitMethod, r.Noise, r.RawNoise, r.TensileMethod)
			for _, w := range r.Warnings {
				fmt.Println("   W:", w)
			}
		}
	}
}
