package allowables_test

import (
	"bufio"
	"fmt"
	"os"
	"strconv"
	"strings"

	"lotproof/lots/allowables"
)

// Design values from a multi-lot campaign: the NIST StRD data set SiRstv
// (silicon resistivity, 5 instruments x 5 replicates, read from
// testdata/stats/nist_anova), with the instruments in the role of lots.
// The lots are pooled; the handbook procedure then takes the Weibull
// distribution (checked first, and accepted by its Anderson-Darling OSL).
// The default lot-aware method keeps that bound here: both random-effects
// bounds are higher.
// With the normal distribution forced, the A- and B-basis values agree
// with scipy's in testdata/allowables/ref.json (195.85558 and 195.99500).
func ExampleDesignValues() {
	groups, err := readSiRstv("../../testdata/stats/nist_anova/SiRstv.dat")
	if err != nil {
		fmt.Println(err)
		return
	}
	out, err := allowables.DesignValues(groups, allowables.DefaultOptions())
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s (B-basis by %s, handbook choice %s): A-basis %.5f, B-basis %.5f\n", out.Method, out.Used, out.AutoMethod, out.A, out.B)

	opt := allowables.DefaultOptions()
	opt.Method = allowables.Handbook
	out, err = allowables.DesignValues(groups, opt)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("handbook %s: A-basis %.5f, B-basis %.5f\n", out.Method, out.A, out.B)

	opt.Method = allowables.Normal
	out, err = allowables.DesignValues(groups, opt)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: A-basis %.5f, B-basis %.5f\n", out.Method, out.A, out.B)
	// Output:
	// lot-aware (B-basis by weibull, handbook choice weibull): A-basis 195.62871, B-basis 195.93036
	// handbook weibull: A-basis 195.62871, B-basis 195.93036
	// normal: A-basis 195.85558, B-basis 195.99500
}

// readSiRstv reads the values below the "Data: Instrument Resistance" line
// of the NIST StRD file SiRstv.dat, one slice per instrument.
func readSiRstv(name string) ([][]float64, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	var groups [][]float64
	index := map[string]int{}
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
		i, ok := index[fields[0]]
		if !ok {
			i = len(groups)
			index[fields[0]] = i
			groups = append(groups, nil)
		}
		groups[i] = append(groups[i], v)
	}
	return groups, sc.Err()
}
