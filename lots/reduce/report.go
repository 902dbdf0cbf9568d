package reduce

import (
	"math"

	"lotproof/lots"
	"lotproof/lots/units"
)

// Caution is shown with every reduction.
const Caution = "Computed properties support, and never replace, the governing test standard, specification, regulations and licensed engineering judgement."

// FitReport is the elastic fit of a specimen, in display units.
type FitReport struct {
	Slope      lots.Float `json:"slope"` // display modulus unit
	Intercept  lots.Float `json:"intercept"`
	R2         lots.Float `json:"r2"`
	ResidualSD lots.Float `json:"residual_sd"`
	// SlopeSEPercent is the standard error of the slope (the modulus) in
	// % of it.
	SlopeSEPercent lots.Float `json:"slope_se_percent"`
	PointsUsed     int        `json:"points_used"`
	StressFrom     lots.Float `json:"stress_from"`
	StressTo       lots.Float `json:"stress_to"`
	FirstLine      int        `json:"first_line"`
	LastLine       int        `json:"last_line"`
	Automatic      bool       `json:"automatic"`
	Method         string     `json:"method"`
	// The stress range as percentages of the proof strength.
	FromPercentProof lots.Float `json:"from_percent_of_proof"`
	ToPercentProof   lots.Float `json:"to_percent_of_proof"`
}

// GlitchReport is a glitch found in a record.
type GlitchReport struct {
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

// TensileReport tells how the tensile strength was found.
type TensileReport struct {
	Method            string     `json:"method"`
	HighestRaw        lots.Float `json:"highest_raw"` // stress unit
	StrainFromPercent lots.Float `json:"strain_from_percent"`
	StrainToPercent   lots.Float `json:"strain_to_percent"`
	PointsUsed        int        `json:"points_used"`
}

// AuditReport is the audit of one specimen's reduction.
type AuditReport struct {
	Points                  int            `json:"points"`
	DuplicatesLeftOut       int            `json:"duplicates_left_out"`
	BackwardLeftOut         int            `json:"backward_left_out"`
	LoopPointsLeftOut       int            `json:"loop_points_left_out"`
	NoiseSD                 lots.Float     `json:"noise_sd"`
	RawNoiseSD              lots.Float     `json:"raw_noise_sd"`
	StrainNoiseSDPercent    lots.Float     `json:"strain_noise_sd_percent"`
	PointsPerWorkingPoint   int            `json:"points_per_working_point"`
	RepeatedLeftOut         int            `json:"repeated_left_out"`
	Glitches                []GlitchReport `json:"glitches"`
	Tensile                 TensileReport  `json:"tensile"`
	ElasticFit              *FitReport     `json:"elastic_fit"`
	ToeShiftPercent         lots.Float     `json:"toe_shift_percent"`
	OffsetPercent           float64        `json:"offset_percent"`
	ProofStrainPercent      lots.Float     `json:"proof_strain_percent"`
	ProofMethod             string         `json:"proof_method"`
	TensileStrainPercent    lots.Float     `json:"tensile_strain_percent"`
	Fractured               bool           `json:"fractured"`
	FractureStrainPercent   lots.Float     `json:"fracture_strain_percent"`
	ElongationMethod        string         `json:"elongation_method"`
	ElongationRecordPercent lots.Float     `json:"elongation_from_record_percent"`
}

// SpecimenReport is one specimen's properties and audit.
type SpecimenReport struct {
	Specimen   string                `json:"specimen"`
	Lot        string                `json:"lot"`
	Heat       string                `json:"heat"`
	Supplier   string                `json:"supplier"`
	Material   string                `json:"material"`
	Tested     string                `json:"tested"`
	Condition  string                `json:"condition"`
	Source     string                `json:"source"`
	Properties map[string]lots.Float `json:"properties"`
	Audit      AuditReport           `json:"audit"`
	Notes      []string              `json:"notes"`
	Warnings   []string              `json:"warnings"`
}

// Report is a reduction with the audit of every specimen.
type Report struct {
	Tool      string            `json:"tool"`
	Version   string            `json:"version"`
	Method    string            `json:"method"`
	Units     map[string]string `json:"units"`
	Caution   string            `json:"caution"`
	Specimens []SpecimenReport  `json:"specimens"`
}

// NewReport is the results with the audit of every specimen, in the
// display units of sys, as written with --format json.
func NewReport(rs []*Result, sys units.System) Report {
	out := Report{
		Tool: "lotproof reduce", Version: lots.Version,
		Method: "glitches (points departing from both neighbouring trends by more than 10 noise SDs, noise from the median absolute second difference) left out; records over 20,000 points averaged in bins of consecutive points; modulus: least squares over the straight stress window with the smallest combined error (ASTM E111); proof: offset method (ISO 6892-1 Rp, ASTM E8/E8M) after toe compensation; ReH/ReL, Ag, A, Z: ISO 6892-1; Rm: vertex of a least-squares parabola through the points near the maximum force, never above the highest raw point; toughness: trapezoidal area under the engineering curve to fracture; resilience: Rp^2/(2E)",
		Units:  map[string]string{}, Caution: Caution, Specimens: []SpecimenReport{},
	}
	for _, c := range Columns {
		out.Units[c.Name] = c.Unit.Display(sys).Symbol
	}
	mod := Columns[0].Unit.Display(sys)
	stress := units.Internal(units.Stress).Display(sys)
	out.Units["audit slope"] = mod.Symbol
	out.Units["audit stresses"] = stress.Symbol
	pct := func(v float64) lots.Float { return lots.Float(100 * v) }
	for _, r := range rs {
		sj := SpecimenReport{
			Specimen: r.ID, Lot: r.Lot, Heat: r.Heat, Supplier: r.Supplier, Material: r.Material,
			Tested: r.Tested, Condition: r.Condition, Source: r.Source, Properties: map[string]lots.Float{},
			Notes: append([]string{}, r.Notes...), Warnings: append([]string{}, r.Warnings...),
		}
		for _, c := range Columns {
			sj.Properties[c.Name] = lots.Float(c.Unit.Display(sys).FromInternal(c.Value(r)))
		}
		a := &sj.Audit
		a.Points, a.DuplicatesLeftOut, a.BackwardLeftOut, a.LoopPointsLeftOut = r.Points, r.Duplicates, r.Backward, r.LoopPoints
		a.NoiseSD = lots.Float(stress.FromInternal(r.Noise))
		a.RawNoiseSD = lots.Float(stress.FromInternal(r.RawNoise))
		a.StrainNoiseSDPercent = pct(r.StrainNoise)
		a.PointsPerWorkingPoint, a.RepeatedLeftOut = r.Bin, r.RepeatedPoints
		a.Glitches = []GlitchReport{}
		for _, g := range r.Glitches {
			gj := GlitchReport{FirstLine: g.Line, LastLine: g.LastLine, Points: g.Points, Series: g.Series, Kind: g.Kind, LeftOut: g.Kind != "step"}
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
		a.Tensile = TensileReport{Method: r.TensileMethod, HighestRaw: lots.Float(stress.FromInternal(r.TensileRaw)),
			StrainFromPercent: pct(r.TensileFrom), StrainToPercent: pct(r.TensileTo), PointsUsed: r.TensileN}
		if r.FitOK {
			a.ElasticFit = &FitReport{
				Slope: lots.Float(mod.FromInternal(r.Fit.Slope)), Intercept: lots.Float(stress.FromInternal(r.Fit.Intercept)),
				R2: lots.Float(r.Fit.R2), ResidualSD: lots.Float(stress.FromInternal(r.Fit.ResidualSD)), PointsUsed: r.Fit.N,
				SlopeSEPercent: lots.Float(100 * r.Fit.SlopeRelSE),
				StressFrom:     lots.Float(stress.FromInternal(r.Fit.From)), StressTo: lots.Float(stress.FromInternal(r.Fit.To)),
				FirstLine: r.Fit.FirstLine, LastLine: r.Fit.LastLine, Automatic: r.Fit.Auto, Method: r.FitMethod,
				FromPercentProof: lots.Float(r.Fit.FromPercentProof), ToPercentProof: lots.Float(r.Fit.ToPercentProof),
			}
		}
		a.ToeShiftPercent = pct(r.ToeShift)
		a.OffsetPercent = 100 * r.Offset
		a.ProofStrainPercent, a.TensileStrainPercent = pct(r.ProofStrain), pct(r.TensileStrain)
		a.ProofMethod = r.ProofMethod
		a.Fractured, a.FractureStrainPercent = r.Fractured, pct(r.FractureStrain)
		a.ElongationMethod, a.ElongationRecordPercent = r.ElongationMethod, pct(r.ExtensometerElongation)
		out.Specimens = append(out.Specimens, sj)
	}
	return out
}
