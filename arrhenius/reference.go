package arrhenius

import (
	"math"
	"sort"
	"strings"

	"github.com/fickfit/fickfit/internal/jsonx"
)

// Reference is one published pair (D0, Q) for a diffusing species in a
// host, with where it comes from.
type Reference struct {
	// Name is the stable short name used on the command line ("C-in-gamma-Fe").
	Name string
	// Aliases are other accepted names (case-insensitive).
	Aliases []string
	Solute  string
	Host    string
	D0      float64 // m²/s
	Q       float64 // J/mol
	// TMin and TMax bound the temperatures (K) where the row applies;
	// RangeNote says where that range comes from.
	TMin, TMax float64
	RangeNote  string
	// Source names the book, edition and table.
	Source string
	// FromMemory is true when the values were written down from memory of
	// the source and not checked against a copy.
	FromMemory bool
	// Checks are D values printed in the same source, which the row must
	// reproduce (tests do).
	Checks []ReferenceCheck
}

// ReferenceCheck is a D value at a temperature as printed in a source.
type ReferenceCheck struct {
	T      float64 // K
	D      float64 // m²/s
	Source string
}

const (
	callister = "W. D. Callister Jr. & D. G. Rethwisch, Materials Science and Engineering: An Introduction, 8th ed. (Wiley, 2010), Table 5.2 \"A tabulation of diffusion data\" (values, edition and table number from memory)"
	calcCol   = "same table, column \"calculated values\" (from memory)"
	phaseNote = "the source gives no range; set here to the host phase's stability field at ambient pressure (common practice, no source)"
)

// references is the built-in table. Only rows whose values the author is
// confident of are included; nitrogen in austenite and in ferrite and
// nickel in austenite are left out because no handbook row could be
// recalled with its source reliably enough. Check values printed with two
// significant figures reproduce to within their rounding and the R the
// source used (8.31).
var references = []Reference{
	{Name: "C-in-gamma-Fe", Aliases: []string{"C-in-austenite"}, Solute: "C", Host: "γ-Fe (austenite)",
		D0: 2.3e-5, Q: 148e3, TMin: 1000, TMax: 1667, RangeNote: phaseNote + "; lower end the eutectoid 727 °C",
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{1173.15, 5.9e-12, calcCol}, {1373.15, 5.3e-11, calcCol}}},
	{Name: "C-in-alpha-Fe", Aliases: []string{"C-in-ferrite"}, Solute: "C", Host: "α-Fe (ferrite)",
		D0: 6.2e-7, Q: 80e3, TMin: 300, TMax: 1184, RangeNote: phaseNote + "; later editions list 1.1e-6 m²/s and 87.4 kJ/mol (from memory)",
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{773.15, 2.4e-12, calcCol}, {1173.15, 1.7e-10, calcCol}}},
	{Name: "Fe-in-alpha-Fe", Solute: "Fe", Host: "α-Fe (ferrite), self-diffusion",
		D0: 2.8e-4, Q: 251e3, TMin: 773, TMax: 1184, RangeNote: phaseNote,
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{773.15, 3.0e-21, calcCol}, {1173.15, 1.8e-15, calcCol}}},
	{Name: "Fe-in-gamma-Fe", Solute: "Fe", Host: "γ-Fe (austenite), self-diffusion",
		D0: 5.0e-5, Q: 284e3, TMin: 1184, TMax: 1667, RangeNote: phaseNote,
		Source: callister, FromMemory: true,
		// The source also prints D at 900 °C (1.1e-17 m²/s, from memory), below
		// the γ field of pure iron; only the check inside the range is kept.
		Checks: []ReferenceCheck{{1373.15, 7.8e-16, calcCol}}},
	{Name: "Cu-in-Cu", Solute: "Cu", Host: "Cu, self-diffusion",
		D0: 7.8e-5, Q: 211e3, TMin: 700, TMax: 1357, RangeNote: phaseNote,
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{773.15, 4.2e-19, calcCol}}},
	{Name: "Zn-in-Cu", Solute: "Zn", Host: "Cu",
		D0: 2.4e-5, Q: 189e3, TMin: 700, TMax: 1300, RangeNote: phaseNote,
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{773.15, 4.0e-18, calcCol}}},
	{Name: "Al-in-Al", Solute: "Al", Host: "Al, self-diffusion",
		D0: 2.3e-4, Q: 144e3, TMin: 600, TMax: 933, RangeNote: phaseNote,
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{773.15, 4.2e-14, calcCol}}},
	{Name: "Cu-in-Al", Solute: "Cu", Host: "Al",
		D0: 6.5e-5, Q: 136e3, TMin: 600, TMax: 933, RangeNote: phaseNote,
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{773.15, 4.1e-14, calcCol}}},
	{Name: "Mg-in-Al", Solute: "Mg", Host: "Al",
		D0: 1.2e-4, Q: 131e3, TMin: 600, TMax: 933, RangeNote: phaseNote,
		Source: callister, FromMemory: true,
		Checks: []ReferenceCheck{{823.15, 5.8e-13, "same book, Example Problem 5.4, D of Mg in Al at 550 °C (example number from memory)"}}},
}

// References returns the built-in table, sorted by name.
func References() []Reference {
	out := append([]Reference(nil), references...)
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out
}

// ReferenceNames returns the valid names, sorted.
func ReferenceNames() []string {
	var names []string
	for _, r := range References() {
		names = append(names, r.Name)
	}
	return names
}

// LookupReference returns the row with the given name or alias
// (case-insensitive); an unknown name is an error listing the valid ones.
func LookupReference(name string) (Reference, error) {
	key := strings.ToLower(strings.TrimSpace(name))
	for _, r := range references {
		if strings.ToLower(r.Name) == key {
			return r, nil
		}
		for _, a := range r.Aliases {
			if strings.ToLower(a) == key {
				return r, nil
			}
		}
	}
	return Reference{}, badInput(name, "reference", "no such reference entry; valid names: %s", strings.Join(ReferenceNames(), ", "))
}

// D returns D (m²/s) of the row at T (K).
func (r Reference) D(T float64) float64 { return r.D0 * math.Exp(-r.Q/(R*T)) }

// Calibration returns the row as a calibration without uncertainty
// (handbooks rarely state one): intervals from it cover only the part's
// own measurement, and results say so.
func (r Reference) Calibration() Calibration {
	src := "reference " + r.Name + ": " + r.Source
	return Calibration{LnD0: math.Log(r.D0), Q: r.Q, Method: "reference", Source: src, TMin: r.TMin, TMax: r.TMax}
}

// MarshalJSON writes {"name","solute","host","D0":{"value","unit"},
// "Q":{"value","unit"},"valid_K":[lo,hi],"range_note","source","from_memory","checks"}.
func (r Reference) MarshalJSON() ([]byte, error) {
	type v struct {
		Value float64 `json:"value"`
		Unit  string  `json:"unit"`
	}
	type check struct {
		T      float64 `json:"temperature_K"`
		D      float64 `json:"D"`
		Source string  `json:"source"`
	}
	out := struct {
		Name       string     `json:"name"`
		Aliases    []string   `json:"aliases,omitempty"`
		Solute     string     `json:"solute"`
		Host       string     `json:"host"`
		D0         v          `json:"D0"`
		Q          v          `json:"Q"`
		Valid      [2]float64 `json:"valid_K"`
		RangeNote  string     `json:"range_note"`
		Source     string     `json:"source"`
		FromMemory bool       `json:"from_memory"`
		Checks     []check    `json:"checks"`
	}{Name: r.Name, Aliases: r.Aliases, Solute: r.Solute, Host: r.Host, D0: v{r.D0, "m2/s"}, Q: v{r.Q, "J/mol"},
		Valid: [2]float64{r.TMin, r.TMax}, RangeNote: r.RangeNote, Source: r.Source, FromMemory: r.FromMemory, Checks: []check{}}
	for _, c := range r.Checks {
		out.Checks = append(out.Checks, check(c))
	}
	return jsonx.Marshal(out)
}
