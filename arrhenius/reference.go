package arrhenius

import (
	"fmt"
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
	// Source names the book, edition, table and page, and the table's own
	// primary source for the row.
	Source string
	// FromMemory is true when the values were written down from memory of
	// the source and not checked against a copy. The rows of the built-in
	// table were all checked (the field stays for tables of other origin).
	FromMemory bool
	// Checks are D values printed in the same source, which the row must
	// reproduce (tests do); none for the built-in rows, whose source prints
	// D0 and Q only.
	Checks []ReferenceCheck
}

// ReferenceCheck is a D value at a temperature as printed in a source.
type ReferenceCheck struct {
	T      float64 // K
	D      float64 // m²/s
	Source string
}

// The table's source, checked against a copy of it (not from memory).
// The page seen is printed page 150 of chapter 5 in a stored online copy
// (digilib.universitaspertamina.ac.id, "Materials Science and Engineering
// An Introduction", file page 178); that page does not state the edition,
// but its rows (Cu self-diffusion 2.5e-5 m²/s, 200 kJ/mol; C in α-Fe
// 1.1e-6 m²/s, 87.4 kJ/mol) and its tutorial-video margin notes are those
// of the 9th (2014) and 10th (2018) editions, not of the 7th and 8th,
// whose values differ. The copy of the table the tests compare with is
// testdata/reference/diffusion_table.csv.
const (
	callister = "W. D. Callister Jr. & D. G. Rethwisch, Materials Science and Engineering: An Introduction (Wiley), Table 5.2 \"A Tabulation of Diffusion Data\", printed page 150 (9th/10th-edition layout; the edition is not printed on the page checked)"
	smithells = "; the table's own source for this row: E. A. Brandes & G. B. Brook (eds.), Smithells Metals Reference Book, 7th ed., Butterworth-Heinemann, 1992"
	addaPh    = "; the table's own source for this row: Y. Adda & J. Philibert, La Diffusion dans les Solides, Presses Universitaires de France, 1966"
	askill    = "; the table's own source for this row: J. Askill, Tracer Diffusion Data for Metals, Alloys, and Simple Oxides, IFI/Plenum, 1970"
	phaseNote = "the source gives no range; set here to the host phase's stability field at ambient pressure (common practice, no source)"
)

// Default spread of a row (one standard uncertainty): D within a factor
// 1.5 at the centre of the row's range, Q within 5 %. Basis: a handbook
// row gives one (D0, Q) for a pure host, while a part is an alloy of its
// own composition — for carbon in austenite D depends on the carbon
// content and on the alloying elements, and equations fitted to Fe–C
// alloys misdescribe alloyed carburizing steels (S.-J. Lee, D. K. Matlock
// & C. J. Van Tyne, ISIJ International 51 (2011) 1903–1911) — and
// tabulations of one system from different primary sources differ by tens
// of per cent. The factors themselves are engineering judgement, no
// source; a user who knows better sets them (ReferenceSpread).
const (
	DefaultSpreadFactor = 1.5
	DefaultSpreadQ      = 0.05
	// SpreadBasis says why the default spread is what it is.
	SpreadBasis = "a handbook row describes a pure host, not this part's alloy and composition; for carbon in austenite D depends on carbon content and alloying (Lee, Matlock & Van Tyne, ISIJ International 51 (2011) 1903–1911); the factors are engineering judgement, no source"
)

// references is the built-in table: rows of the source above whose values
// were checked against a copy of it. Rows of earlier editions written
// down from memory (with other values for C in α-Fe, Cu self-diffusion
// and Mg in Al) were replaced by these.
var references = []Reference{
	{Name: "C-in-gamma-Fe", Aliases: []string{"C-in-austenite"}, Solute: "C", Host: "γ-Fe (austenite)",
		D0: 2.3e-5, Q: 148e3, TMin: 1000, TMax: 1667, RangeNote: phaseNote + "; lower end the eutectoid 727 °C",
		Source: callister + smithells},
	{Name: "C-in-alpha-Fe", Aliases: []string{"C-in-ferrite"}, Solute: "C", Host: "α-Fe (ferrite)",
		D0: 1.1e-6, Q: 87.4e3, TMin: 300, TMax: 1184, RangeNote: phaseNote,
		Source: callister + addaPh},
	{Name: "N-in-gamma-Fe", Aliases: []string{"N-in-austenite"}, Solute: "N", Host: "γ-Fe (austenite)",
		D0: 9.1e-5, Q: 168e3, TMin: 1184, TMax: 1667, RangeNote: phaseNote + " of pure iron (nitrogen widens it downwards)",
		Source: callister + smithells},
	{Name: "N-in-alpha-Fe", Aliases: []string{"N-in-ferrite"}, Solute: "N", Host: "α-Fe (ferrite)",
		D0: 5.0e-7, Q: 77e3, TMin: 300, TMax: 1184, RangeNote: phaseNote,
		Source: callister + addaPh},
	{Name: "Fe-in-alpha-Fe", Solute: "Fe", Host: "α-Fe (ferrite), self-diffusion",
		D0: 2.8e-4, Q: 251e3, TMin: 773, TMax: 1184, RangeNote: phaseNote,
		Source: callister + smithells},
	{Name: "Fe-in-gamma-Fe", Solute: "Fe", Host: "γ-Fe (austenite), self-diffusion",
		D0: 5.0e-5, Q: 284e3, TMin: 1184, TMax: 1667, RangeNote: phaseNote,
		Source: callister + smithells},
	{Name: "Cu-in-Cu", Solute: "Cu", Host: "Cu, self-diffusion",
		D0: 2.5e-5, Q: 200e3, TMin: 700, TMax: 1357, RangeNote: phaseNote,
		Source: callister + askill},
	{Name: "Zn-in-Cu", Solute: "Zn", Host: "Cu",
		D0: 2.4e-5, Q: 189e3, TMin: 700, TMax: 1300, RangeNote: phaseNote,
		Source: callister + smithells},
	{Name: "Al-in-Al", Solute: "Al", Host: "Al, self-diffusion",
		D0: 2.3e-4, Q: 144e3, TMin: 600, TMax: 933, RangeNote: phaseNote,
		Source: callister + smithells},
	{Name: "Cu-in-Al", Solute: "Cu", Host: "Al",
		D0: 6.5e-5, Q: 136e3, TMin: 600, TMax: 933, RangeNote: phaseNote,
		Source: callister + smithells},
	{Name: "Mg-in-Al", Solute: "Mg", Host: "Al",
		D0: 1.2e-4, Q: 130e3, TMin: 600, TMax: 933, RangeNote: phaseNote,
		Source: callister + smithells},
}

// ReferenceNote is said with every answer that rests on a row of the
// reference table (warning code "reference-literature").
const ReferenceNote = "This answer rests on published handbook values, not on this laboratory's calibration of its own steel and furnace: the interval includes the table row's spread (stated with the calibration), not a measured one. Before deciding on parts, calibrate: fit coupons of this steel, treated in this furnace at three or more temperatures, with fickfit arrhenius, and use that line (--calibration)."

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

// Calibration returns the row as a calibration with the default spread
// (DefaultSpreadFactor, DefaultSpreadQ): see CalibrationWithSpread.
func (r Reference) Calibration() Calibration {
	c, _ := r.CalibrationWithSpread(DefaultSpreadFactor, DefaultSpreadQ)
	return c
}

// CalibrationWithSpread returns the row as a calibration whose intervals
// carry the row's own spread: D known within the factor f (one standard
// uncertainty, f ≥ 1) at the centre Tc of the row's range in 1/T, and Q
// within the relative standard uncertainty qrel, independently. In the
// centred form ln D(x) = ln D(xc) − Q·(x − xc), x = 1/(RT):
// Var ln D(xc) = (ln f)², Var Q = (qrel·Q)², so that
// Var ln D0 = (ln f)² + xc²Var Q and Cov(ln D0, Q) = xc·Var Q. The
// covariance is taken as known (normal quantiles). f = 1 and qrel = 0 give
// a calibration without uncertainty, whose intervals cover only the part's
// own profile (and say so).
func (r Reference) CalibrationWithSpread(f, qrel float64) (Calibration, error) {
	if !(f >= 1) || math.IsInf(f, 0) {
		return Calibration{}, badInput(r.Name, "spread", "the spread factor %g must be a number ≥ 1 (1.5 means D is known within a factor 1.5 at one standard uncertainty)", f)
	}
	if !(qrel >= 0 && qrel < 1) {
		return Calibration{}, badInput(r.Name, "spread", "the relative uncertainty of Q %g must lie between 0 and 1 (0.05 for 5 %%)", qrel)
	}
	src := "reference " + r.Name + ": " + r.Source
	c := Calibration{LnD0: math.Log(r.D0), Q: r.Q, Method: "reference", Source: src, TMin: r.TMin, TMax: r.TMax}
	sl, vq := math.Log(f), (qrel*r.Q)*(qrel*r.Q)
	xc := (1/r.TMin + 1/r.TMax) / (2 * R)
	c.Cov[0][0] = sl*sl + xc*xc*vq
	c.Cov[1][1] = vq
	c.Cov[0][1] = xc * vq
	c.Cov[1][0] = c.Cov[0][1]
	tc := 1 / (R * xc)
	if f == DefaultSpreadFactor && qrel == DefaultSpreadQ {
		c.Spread = fmt.Sprintf("Spread of the table row put on the answer (default): D within a factor %g at %s and Q within %g %% (one standard uncertainty); basis: %s.", f, tk(tc), 100*qrel, SpreadBasis)
	} else {
		c.Spread = fmt.Sprintf("Spread of the table row put on the answer (set by the user): D within a factor %g at %s and Q within %g %% (one standard uncertainty).", f, tk(tc), 100*qrel)
	}
	return c, nil
}

// MarshalJSON writes {"name","solute","host","D0":{"value","unit"},
// "Q":{"value","unit"},"valid_K":[lo,hi],"range_note","source","from_memory","checks",
// "default_spread":{"D_factor","Q_relative","basis"}}.
func (r Reference) MarshalJSON() ([]byte, error) {
	type v struct {
		Value float64 `json:"value"`
		Unit  string  `json:"unit"`
	}
	type spread struct {
		DFactor   float64 `json:"D_factor"`
		QRelative float64 `json:"Q_relative"`
		Basis     string  `json:"basis"`
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
		Spread     spread     `json:"default_spread"`
	}{Spread: spread{DFactor: DefaultSpreadFactor, QRelative: DefaultSpreadQ, Basis: SpreadBasis}, Name: r.Name, Aliases: r.Aliases, Solute: r.Solute, Host: r.Host, D0: v{r.D0, "m2/s"}, Q: v{r.Q, "J/mol"},
		Valid: [2]float64{r.TMin, r.TMax}, RangeNote: r.RangeNote, Source: r.Source, FromMemory: r.FromMemory, Checks: []check{}}
	for _, c := range r.Checks {
		out.Checks = append(out.Checks, check(c))
	}
	return jsonx.Marshal(out)
}
