package main

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"lotproof/lots"
	"lotproof/lots/input"
	"lotproof/lots/progress"
	"lotproof/lots/reduce"
	"lotproof/lots/render"
	"lotproof/lots/units"
)

type reduceOptions struct {
	Paths         []string
	ModulusRange  string  // "LO:HI" in MPa (ksi with --units us); empty: automatic
	OffsetPercent float64 // offset of the proof strength [%]
	PlotDir       string  // write one SVG per specimen here
	Out           output
}

func init() { register(newReduceCmd) }

func newReduceCmd(g *globalOptions, st streams) *cobra.Command {
	var o reduceOptions
	var showFormat bool
	cmd := &cobra.Command{
		Use:   "reduce PATH...",
		Short: "Reduce raw tensile records to specimen properties",
		Long: `reduce reads raw tensile records (lotproof's record format: a metadata block
and force against extension or strain; lotproof reduce --record-format
describes it) from files, folders of *.rec files, or - for standard input,
and computes per specimen:
modulus (least-squares elastic line, ASTM E111), 0.2 % offset proof strength
(ISO 6892-1 Rp0.2, ASTM E8/E8M offset method), upper and lower yield strength
(ISO 6892-1 ReH, ReL), tensile strength, uniform elongation (Ag), elongation
after fracture, reduction of area, toughness (area under the curve) and the
modulus of resilience.

The output is the specimen results CSV the other commands read, so
  lotproof reduce raw/ | lotproof summary -
works. --format json adds the audit of every specimen: points used for the
modulus, R^2, residual SD, toe shift, notes and warnings. A property that
cannot be determined is left empty with a warning on standard error.

Computed properties support, and never replace, the governing test standard,
specification, regulations and licensed engineering judgement.`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) == 0 && !showFormat {
				return usageError{fmt.Errorf("reduce expects one or more record files or folders (or -); see lotproof reduce --help")}
			}
			return nil
		},
		RunE: withOutput(g, st, &o.Out, func(args []string) error {
			if showFormat {
				_, err := io.WriteString(st.Out, reduce.FormatDoc)
				return err
			}
			o.Paths = args
			return runReduce(o, st)
		}),
	}
	cmd.Flags().StringVar(&o.ModulusRange, "modulus-range", "", "stress range LO:HI of the elastic fit in MPa (ksi with --units us); default: found automatically")
	cmd.Flags().Float64Var(&o.OffsetPercent, "offset", 0.2, "plastic strain of the proof strength in %")
	cmd.Flags().BoolVar(&showFormat, "record-format", false, "print the description of the raw record format and exit")
	cmd.Flags().StringVar(&o.PlotDir, "plot-dir", "", "write a stress-strain plot SPECIMEN.svg per specimen into this folder")
	return cmd
}

// reduceOpts turns the flags into reduce.Options.
func (o reduceOptions) reduceOpts() (reduce.Options, error) {
	var opt reduce.Options
	if !(o.OffsetPercent > 0 && o.OffsetPercent <= 5) {
		return opt, usageError{fmt.Errorf("--offset %g: expected a plastic strain in %% above 0 and at most 5, e.g. 0.2", o.OffsetPercent)}
	}
	opt.Offset = o.OffsetPercent / 100
	if o.ModulusRange != "" {
		a, b, ok := strings.Cut(o.ModulusRange, ":")
		lo, err1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
		hi, err2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
		if !ok || err1 != nil || err2 != nil || !(lo >= 0) || !(hi > lo) || math.IsInf(hi, 0) {
			return opt, usageError{fmt.Errorf("--modulus-range %q: expected LO:HI with 0 <= LO < HI, e.g. 40:160", o.ModulusRange)}
		}
		u, _ := units.Parse("MPa")
		u = u.Display(o.Out.System)
		opt.ModulusFrom, opt.ModulusTo = u.ToInternal(lo), u.ToInternal(hi)
	}
	return opt, nil
}

// reduceInputs parses and reduces every record named by paths: files,
// folders (their *.rec files in name order) or - for standard input, one
// file at a time so that only one file's points are held. Problems from
// every file are collected into one input error. fileDone, when set, is
// called after each file (a progress display over the files of
// inputFiles).
func reduceInputs(paths []string, st streams, opt reduce.Options, fileDone func()) ([]*reduce.Result, error) {
	b := reduce.NewBatch(opt)
	parse := func(r io.Reader, name string) error {
		recs, err := reduce.Parse(r, name)
		if err != nil {
			if b.Problems(err) {
				return nil
			}
			return err
		}
		return b.Add(recs)
	}
	open := func(p string) error {
		if fileDone != nil {
			defer fileDone()
		}
		f, err := lots.OpenInput(p, input.Records, nil)
		if err != nil {
			if b.Problems(err) {
				return nil
			}
			return err
		}
		defer f.Close()
		return parse(f, p)
	}
	for _, p := range paths {
		if p == "-" {
			err := parse(input.Limit(st.In, "-", input.Records), "-")
			if fileDone != nil {
				fileDone()
			}
			if err != nil {
				return nil, err
			}
			continue
		}
		fi, err := os.Stat(p)
		if err != nil {
			b.Problems(lots.Inputf(p, "give an existing record file or folder", "cannot open: %v", unwrapPathErr(err)))
			continue
		}
		if !fi.IsDir() {
			if err := open(p); err != nil {
				return nil, err
			}
			continue
		}
		ents, err := os.ReadDir(p)
		if err != nil {
			b.Problems(lots.Inputf(p, "check the folder's permissions", "cannot read the folder: %v", unwrapPathErr(err)))
			continue
		}
		var names []string
		for _, e := range ents {
			if !e.IsDir() && strings.EqualFold(filepath.Ext(e.Name()), reduce.RecordExt) {
				names = append(names, e.Name())
			}
		}
		sort.Strings(names)
		if len(names) == 0 {
			b.Problems(lots.Inputf(p, "raw record files end in .rec", "no %s files in the folder", reduce.RecordExt))
		}
		for _, n := range names {
			if err := open(filepath.Join(p, n)); err != nil {
				return nil, err
			}
		}
	}
	return b.Results()
}

// inputFiles counts the record files named by paths (for a progress
// display; a folder counts its *.rec files).
func inputFiles(paths []string) int {
	n := 0
	for _, p := range paths {
		fi, err := os.Stat(p)
		if p == "-" || err != nil || !fi.IsDir() {
			n++
			continue
		}
		ents, _ := os.ReadDir(p)
		for _, e := range ents {
			if !e.IsDir() && strings.EqualFold(filepath.Ext(e.Name()), reduce.RecordExt) {
				n++
			}
		}
	}
	return n
}

func unwrapPathErr(err error) error {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err
	}
	return err
}

// reduceCaution is shown with every reduction.
const reduceCaution = "Computed properties support, and never replace, the governing test standard, specification, regulations and licensed engineering judgement."

func runReduce(o reduceOptions, st streams) error {
	opt, err := o.reduceOpts()
	if err != nil {
		return err
	}
	bar := progress.New(st.Err, st.ErrTerminal, int64(inputFiles(o.Paths)), "reduce")
	rs, err := reduceInputs(o.Paths, st, opt, func() { bar.Add(1) })
	bar.Finish()
	if err != nil {
		return err
	}
	if o.PlotDir != "" {
		if err := writePlots(o.PlotDir, rs); err != nil {
			return err
		}
	}
	if o.Out.Format != render.JSON {
		for _, r := range rs {
			for _, w := range r.Warnings {
				fmt.Fprintf(st.Err, "lotproof: warning: %s: specimen %s: %s\n", r.Source, r.ID, w)
			}
		}
	}
	return emit(st.Out, func(w io.Writer) error {
		switch o.Out.Format {
		case render.JSON:
			return render.WriteJSON(w, reduceJSON(rs, o.Out.System))
		case render.CSV:
			_, err := w.Write(reduce.ResultsCSV(rs, o.Out.System))
			return err
		}
		return writeTables(w, o.Out.Format, reduceTable(rs, o.Out.System))
	})
}

func writePlots(dir string, rs []*reduce.Result) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return usageError{fmt.Errorf("--plot-dir: %v", err)}
	}
	for _, r := range rs {
		if len(r.Strain) < 2 {
			continue
		}
		b, err := reduce.PlotSVG(r)
		if err != nil {
			return err
		}
		name := strings.Map(func(c rune) rune {
			if c == '/' || c == '\\' || c == ':' || c < ' ' {
				return '_'
			}
			return c
		}, r.ID) + ".svg"
		if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
			return usageError{fmt.Errorf("--plot-dir: %v", err)}
		}
	}
	return nil
}

// reduceTable lays the results out for a terminal, in display units.
func reduceTable(rs []*reduce.Result, sys units.System) *render.Table {
	cols := []string{"specimen", "lot"}
	for _, c := range reduce.Columns {
		cols = append(cols, ">"+lots.Property{Name: c.Name, Unit: c.Unit}.Label(c.Unit.Display(sys)))
	}
	cols = append(cols, ">warnings")
	t := render.NewTable("", cols...)
	for _, r := range rs {
		row := []any{r.ID, r.Lot}
		for _, c := range reduce.Columns {
			row = append(row, render.N(c.Unit.Display(sys).FromInternal(c.Value(r)), 4))
		}
		row = append(row, strconv.Itoa(len(r.Warnings)))
		t.Add(row...)
	}
	t.Note("%s", reduceCaution)
	return t
}

type reduceFitJSON struct {
	Slope      lots.Float `json:"slope"` // display modulus unit
	Intercept  lots.Float `json:"intercept"`
	R2         lots.Float `json:"r2"`
	ResidualSD lots.Float `json:"residual_sd"`
	PointsUsed int        `json:"points_used"`
	StressFrom lots.Float `json:"stress_from"`
	StressTo   lots.Float `json:"stress_to"`
	FirstLine  int        `json:"first_line"`
	LastLine   int        `json:"last_line"`
	Automatic  bool       `json:"automatic"`
	Method     string     `json:"method"`
	// The stress range as percentages of the proof strength.
	FromPercentProof lots.Float `json:"from_percent_of_proof"`
	ToPercentProof   lots.Float `json:"to_percent_of_proof"`
}

type reduceGlitchJSON struct {
	FirstLine int        `json:"first_line"`
	LastLine  int        `json:"last_line"`
	Points    int        `json:"points"`
	Series    string     `json:"series"` // force or extension
	Kind      string     `json:"kind"`   // spike, dropout, excursion, step, repeat
	Size      lots.Float `json:"size"`   // departure from the neighbours' trend: stress unit, or % strain
	NoiseSD   lots.Float `json:"noise_sd"`
	Threshold lots.Float `json:"threshold"`
	LeftOut   bool       `json:"left_out"` // false for an extension step (later properties not reported)
}

type reduceTensileJSON struct {
	Method            string     `json:"method"`
	HighestRaw        lots.Float `json:"highest_raw"` // stress unit
	StrainFromPercent lots.Float `json:"strain_from_percent"`
	StrainToPercent   lots.Float `json:"strain_to_percent"`
	PointsUsed        int        `json:"points_used"`
}

type reduceAuditJSON struct {
	Points                  int                `json:"points"`
	DuplicatesLeftOut       int                `json:"duplicates_left_out"`
	BackwardLeftOut         int                `json:"backward_left_out"`
	LoopPointsLeftOut       int                `json:"loop_points_left_out"`
	NoiseSD                 lots.Float         `json:"noise_sd"`
	RawNoiseSD              lots.Float         `json:"raw_noise_sd"`
	StrainNoiseSDPercent    lots.Float         `json:"strain_noise_sd_percent"`
	PointsPerWorkingPoint   int                `json:"points_per_working_point"`
	RepeatedLeftOut         int                `json:"repeated_left_out"`
	Glitches                []reduceGlitchJSON `json:"glitches"`
	Tensile                 reduceTensileJSON  `json:"tensile"`
	ElasticFit              *reduceFitJSON     `json:"elastic_fit"`
	ToeShiftPercent         lots.Float         `json:"toe_shift_percent"`
	OffsetPercent           float64            `json:"offset_percent"`
	ProofStrainPercent      lots.Float         `json:"proof_strain_percent"`
	TensileStrainPercent    lots.Float         `json:"tensile_strain_percent"`
	Fractured               bool               `json:"fractured"`
	FractureStrainPercent   lots.Float         `json:"fracture_strain_percent"`
	ElongationMethod        string             `json:"elongation_method"`
	ElongationRecordPercent lots.Float         `json:"elongation_from_record_percent"`
}

type reduceSpecimenJSON struct {
	Specimen   string                `json:"specimen"`
	Lot        string                `json:"lot"`
	Heat       string                `json:"heat"`
	Supplier   string                `json:"supplier"`
	Material   string                `json:"material"`
	Tested     string                `json:"tested"`
	Condition  string                `json:"condition"`
	Source     string                `json:"source"`
	Properties map[string]lots.Float `json:"properties"`
	Audit      reduceAuditJSON       `json:"audit"`
	Notes      []string              `json:"notes"`
	Warnings   []string              `json:"warnings"`
}

type reduceResultJSON struct {
	Tool      string               `json:"tool"`
	Version   string               `json:"version"`
	Method    string               `json:"method"`
	Units     map[string]string    `json:"units"`
	Caution   string               `json:"caution"`
	Specimens []reduceSpecimenJSON `json:"specimens"`
}

func reduceJSON(rs []*reduce.Result, sys units.System) reduceResultJSON {
	out := reduceResultJSON{
		Tool: "lotproof reduce", Version: lots.Version,
		Method: "glitches (points departing from both neighbouring trends by more than 10 noise SDs, noise from the median absolute second difference) left out; records over 20,000 points averaged in bins of consecutive points; modulus: least squares over the straight stress window with the smallest combined error (ASTM E111); proof: offset method (ISO 6892-1 Rp, ASTM E8/E8M) after toe compensation; ReH/ReL, Ag, A, Z: ISO 6892-1; Rm: vertex of a least-squares parabola through the points near the maximum force, never above the highest raw point; toughness: trapezoidal area under the engineering curve to fracture; resilience: Rp^2/(2E)",
		Units:  map[string]string{}, Caution: reduceCaution, Specimens: []reduceSpecimenJSON{},
	}
	for _, c := range reduce.Columns {
		out.Units[c.Name] = c.Unit.Display(sys).Symbol
	}
	mod := reduce.Columns[0].Unit.Display(sys)
	stress := units.Internal(units.Stress).Display(sys)
	out.Units["audit slope"] = mod.Symbol
	out.Units["audit stresses"] = stress.Symbol
	pct := func(v float64) lots.Float { return lots.Float(100 * v) }
	for _, r := range rs {
		sj := reduceSpecimenJSON{
			Specimen: r.ID, Lot: r.Lot, Heat: r.Heat, Supplier: r.Supplier, Material: r.Material,
			Tested: r.Tested, Condition: r.Condition, Source: r.Source, Properties: map[string]lots.Float{},
			Notes: append([]string{}, r.Notes...), Warnings: append([]string{}, r.Warnings...),
		}
		for _, c := range reduce.Columns {
			sj.Properties[c.Name] = lots.Float(c.Unit.Display(sys).FromInternal(c.Value(r)))
		}
		a := &sj.Audit
		a.Points, a.DuplicatesLeftOut, a.BackwardLeftOut, a.LoopPointsLeftOut = r.Points, r.Duplicates, r.Backward, r.LoopPoints
		a.NoiseSD = lots.Float(stress.FromInternal(r.Noise))
		a.RawNoiseSD = lots.Float(stress.FromInternal(r.RawNoise))
		a.StrainNoiseSDPercent = pct(r.StrainNoise)
		a.PointsPerWorkingPoint, a.RepeatedLeftOut = r.Bin, r.RepeatedPoints
		a.Glitches = []reduceGlitchJSON{}
		for _, g := range r.Glitches {
			gj := reduceGlitchJSON{FirstLine: g.Line, LastLine: g.LastLine, Points: g.Points, Series: g.Series, Kind: g.Kind, LeftOut: g.Kind != "step"}
			switch g.Series {
			case "force":
				gj.Size, gj.NoiseSD, gj.Threshold = lots.Float(stress.FromInternal(g.Size)), lots.Float(stress.FromInternal(g.Noise)), lots.Float(stress.FromInternal(g.Threshold))
			case "extension":
				gj.Size, gj.NoiseSD, gj.Threshold = pct(g.Size), pct(g.Noise), pct(g.Threshold)
			default: // a repeated block: no size
				gj.Size, gj.NoiseSD, gj.Threshold = lots.Float(math.NaN()), lots.Float(math.NaN()), lots.Float(math.NaN())
			}
			a.Glitches = append(a.Glitches, gj)
		}
		a.Tensile = reduceTensileJSON{Method: r.TensileMethod, HighestRaw: lots.Float(stress.FromInternal(r.TensileRaw)),
			StrainFromPercent: pct(r.TensileFrom), StrainToPercent: pct(r.TensileTo), PointsUsed: r.TensileN}
		if r.FitOK {
			a.ElasticFit = &reduceFitJSON{
				Slope: lots.Float(mod.FromInternal(r.Fit.Slope)), Intercept: lots.Float(stress.FromInternal(r.Fit.Intercept)),
				R2: lots.Float(r.Fit.R2), ResidualSD: lots.Float(stress.FromInternal(r.Fit.ResidualSD)), PointsUsed: r.Fit.N,
				StressFrom: lots.Float(stress.FromInternal(r.Fit.From)), StressTo: lots.Float(stress.FromInternal(r.Fit.To)),
				FirstLine: r.Fit.FirstLine, LastLine: r.Fit.LastLine, Automatic: r.Fit.Auto, Method: r.FitMethod,
				FromPercentProof: lots.Float(r.Fit.FromPercentProof), ToPercentProof: lots.Float(r.Fit.ToPercentProof),
			}
		}
		a.ToeShiftPercent = pct(r.ToeShift)
		a.OffsetPercent = 100 * r.Offset
		a.ProofStrainPercent, a.TensileStrainPercent = pct(r.ProofStrain), pct(r.TensileStrain)
		a.Fractured, a.FractureStrainPercent = r.Fractured, pct(r.FractureStrain)
		a.ElongationMethod, a.ElongationRecordPercent = r.ElongationMethod, pct(r.ExtensometerElongation)
		out.Specimens = append(out.Specimens, sj)
	}
	return out
}
