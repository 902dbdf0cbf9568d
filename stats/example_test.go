package stats_test

import (
	"bufio"
	"fmt"
	"os"
	"strconv"
	"strings"

	"lotproof/stats"
)

// The one-sided normal tolerance factors of a published table: Natrella
// (1963), NBS Handbook 91, Table A-7, gamma = 0.95, n = 10: 2.355 for
// p = 0.90 (B-basis level) and 3.981 for p = 0.99 (A-basis level). Both
// table values are quoted from memory; the same factors are checked to
// 1e-9 against the scipy and mpmath references in noncentral_ref_test.go.
func ExampleNormalK() {
	kB, err := stats.NormalK(10, 0.90, 0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	kA, err := stats.NormalK(10, 0.99, 0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("k(10; 0.90, 0.95) = %.3f\n", kB)
	fmt.Printf("k(10; 0.99, 0.95) = %.3f\n", kA)
	// Output:
	// k(10; 0.90, 0.95) = 2.355
	// k(10; 0.99, 0.95) = 3.981
}

// A lower tolerance bound (90 % content, 95 % confidence) on the 25 values
// of the NIST StRD data set SiRstv (silicon resistivity), read from
// testdata/stats/nist_anova. scipy gives k = 1.8381 and a bound of 195.99500
// (testdata/allowables/ref.json).
func ExampleNormalLowerBound() {
	x, err := readSiRstv("../testdata/stats/nist_anova/SiRstv.dat")
	if err != nil {
		fmt.Println(err)
		return
	}
	b, err := stats.NormalLowerBound(x, 0.90, 0.95)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("n = %d, k = %.4f, bound = %.5f\n", b.N, b.Factor, b.Value)
	// Output:
	// n = 25, k = 1.8381, bound = 195.99500
}

// readSiRstv reads the resistance column below the "Data: Instrument
// Resistance" line of the NIST StRD file SiRstv.dat.
func readSiRstv(name string) ([]float64, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var x []float64
	data := false
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if strings.Join(fields, " ") == "Data: Instrument Resistance" {
			data = true
			continue
		}
		if !data || len(fields) != 2 {
			continue
		}
		v, err := strconv.ParseFloat(fields[1], 64)
		if err != nil {
			return nil, err
		}
		x = append(x, v)
	}
	return x, sc.Err()
}
