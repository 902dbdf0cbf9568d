package units

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// Quantity is a kind of physical quantity.
type Quantity int

// The quantities lotproof knows.
const (
	Stress        Quantity = iota + 1 // strength, modulus; internal MPa
	Strain                            // elongation, reduction of area; internal fraction
	EnergyDensity                     // toughness, resilience; internal MJ/m^3
	Energy                            // impact energy; internal J
	Hardness                          // a hardness scale; never converted between scales
	Dimensionless                     // a plain number
)

func (q Quantity) String() string {
	switch q {
	case Stress:
		return "stress"
	case Strain:
		return "strain"
	case EnergyDensity:
		return "energy per volume"
	case Energy:
		return "energy"
	case Hardness:
		return "hardness"
	case Dimensionless:
		return "dimensionless"
	}
	return "unknown"
}

// System is a unit system for display.
type System string

// The two display systems.
const (
	SI System = "si"
	US System = "us"
)

// ParseSystem reads "si" or "us".
func ParseSystem(s string) (System, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "si":
		return SI, nil
	case "us":
		return US, nil
	}
	return "", fmt.Errorf("unknown unit system %q: expected si or us", s)
}

// Unit is a unit a user may write.
type Unit struct {
	Symbol   string   // as written in files and shown in output
	Quantity Quantity // what it measures
	Factor   float64  // value in this unit times Factor = value in the internal unit
}

// psiMPa is one psi in MPa: 4.4482216152605 N / (25.4 mm)^2.
const psiMPa = 4.4482216152605 / (25.4 * 25.4)

var known = []Unit{
	{"Pa", Stress, 1e-6},
	{"kPa", Stress, 1e-3},
	{"MPa", Stress, 1},
	{"GPa", Stress, 1e3},
	{"N/mm^2", Stress, 1},
	{"psi", Stress, psiMPa},
	{"ksi", Stress, psiMPa * 1e3},
	{"Msi", Stress, psiMPa * 1e6},
	{"%", Strain, 0.01},
	{"mm/mm", Strain, 1},
	{"in/in", Strain, 1},
	{"J/m^3", EnergyDensity, 1e-6},
	{"kJ/m^3", EnergyDensity, 1e-3},
	{"MJ/m^3", EnergyDensity, 1},
	{"in-lbf/in^3", EnergyDensity, psiMPa},
	{"J", Energy, 1},
	{"ft-lbf", Energy, 4.4482216152605 * 0.3048},
	{"HBW", Hardness, 1},
	{"HRC", Hardness, 1},
	{"HRB", Hardness, 1},
	{"HV", Hardness, 1},
	{"1", Dimensionless, 1},
	{"-", Dimensionless, 1},
}

var bySymbol = func() map[string]Unit {
	m := make(map[string]Unit, len(known))
	for _, u := range known {
		m[strings.ToLower(u.Symbol)] = u
	}
	// Common spellings.
	m["n/mm2"] = m["n/mm^2"]
	m["j/m3"] = m["j/m^3"]
	m["kj/m3"] = m["kj/m^3"]
	m["mj/m3"] = m["mj/m^3"]
	m["in-lbf/in3"] = m["in-lbf/in^3"]
	m["ft.lbf"] = m["ft-lbf"]
	m[""] = m["1"]
	return m
}()

// Parse looks a unit symbol up, ignoring case and surrounding space. The
// empty symbol and "1" and "-" mean dimensionless.
func Parse(symbol string) (Unit, error) {
	u, ok := bySymbol[strings.ToLower(strings.TrimSpace(symbol))]
	if !ok {
		return Unit{}, fmt.Errorf("unknown unit %q; known units: %s", symbol, strings.Join(Symbols(), ", "))
	}
	return u, nil
}

// Symbols lists the known unit symbols in a stable order.
func Symbols() []string {
	s := make([]string, 0, len(known))
	for _, u := range known {
		s = append(s, u.Symbol)
	}
	return s
}

// Known returns every unit in a stable order (for documentation tables).
func Known() []Unit {
	out := append([]Unit(nil), known...)
	sort.SliceStable(out, func(i, j int) bool { return out[i].Quantity < out[j].Quantity })
	return out
}

// ToInternal converts a value in unit u to the internal unit of its quantity.
func (u Unit) ToInternal(v float64) float64 { return v * u.Factor }

// FromInternal converts a value in the internal unit to unit u. Division
// leaves representation noise in the last digit (0.149 from 14.9 % gives
// 14.899999999999999), so when the value rounded to 15 or 16 significant
// digits converts back (ToInternal) to exactly v, that rounded value is
// returned: the result is then the cleanest decimal that still reads back
// to the same internal value, and nothing is lost.
func (u Unit) FromInternal(v float64) float64 {
	x := v / u.Factor
	if u.Factor == 1 || math.IsNaN(x) || math.IsInf(x, 0) || x == 0 {
		return x
	}
	for _, p := range [...]int{15, 16} {
		r, err := strconv.ParseFloat(strconv.FormatFloat(x, 'g', p, 64), 64)
		if err == nil && r*u.Factor == v {
			return r
		}
	}
	return x
}

// Display returns the unit in which a property entered as u is shown in
// system s. Stresses entered in GPa or Msi (moduli) are shown in GPa or
// Msi, other stresses in MPa or ksi; strains in percent; energy per
// volume in MJ/m^3 or in-lbf/in^3; energy in J or ft-lbf. Hardness and
// dimensionless values are shown as entered.
func (u Unit) Display(s System) Unit {
	pick := func(si, us string) Unit {
		if s == US {
			return bySymbol[strings.ToLower(us)]
		}
		return bySymbol[strings.ToLower(si)]
	}
	switch u.Quantity {
	case Stress:
		if u.Symbol == "GPa" || u.Symbol == "Msi" {
			return pick("GPa", "Msi")
		}
		return pick("MPa", "ksi")
	case Strain:
		return bySymbol["%"]
	case EnergyDensity:
		return pick("MJ/m^3", "in-lbf/in^3")
	case Energy:
		return pick("J", "ft-lbf")
	}
	return u
}

// Internal returns the internal unit of a quantity.
func Internal(q Quantity) Unit {
	switch q {
	case Stress:
		return bySymbol["mpa"]
	case Strain:
		return bySymbol["mm/mm"]
	case EnergyDensity:
		return bySymbol["mj/m^3"]
	case Energy:
		return bySymbol["j"]
	}
	return bySymbol["1"]
}

// Compatible reports whether values in a and b can be compared: the same
// quantity, and for hardness the same scale (scales are not converted).
func Compatible(a, b Unit) bool {
	if a.Quantity != b.Quantity {
		return false
	}
	return a.Quantity != Hardness || a.Symbol == b.Symbol
}

// CheckValue says what is wrong with a value, already in internal units,
// of quantity q, or returns "" when it is physically possible: stresses,
// energies and hardness must be positive, strains not negative.
func CheckValue(q Quantity, v float64) string {
	switch q {
	case Stress, EnergyDensity, Energy, Hardness:
		if v <= 0 {
			return "a " + q.String() + " must be positive"
		}
	case Strain:
		if v < 0 {
			return "a strain must not be negative"
		}
	}
	return ""
}
