package report

import (
	"bufio"
	"io"
	"strings"

	"github.com/fickfit/fickfit/arrhenius"
)

// References is the Document of rows of the built-in reference table
// (fickfit reference). Its JSON is {"references": […]}.
type References []arrhenius.Reference

// WriteJSON writes the rows.
func (r References) WriteJSON(w io.Writer) error {
	return writeJSON(w, struct {
		envelope
		References []arrhenius.Reference `json:"references"`
	}{envelope{versionOr("")}, nonNil([]arrhenius.Reference(r))})
}

// WriteCSV writes the table reference (and a caution table when a row was
// written from memory).
func (r References) WriteCSV(w io.Writer) error {
	return writeCSVTables(w, func(c *viewCSV) { viewReferencesCSV(c, r) })
}

// WriteText writes the table for people with its sources.
func (r References) WriteText(w io.Writer, o TextOptions) error {
	return writeTextWithCautions(w, o, nil, false, func(bw *bufio.Writer) { viewReferencesText(bw, r, o) })
}

// viewReferenceCaution is the footnote of the reference table.
const viewReferenceCaution = "Rows marked * were written down from memory of the named source and not checked against a copy: check them against the handbook before use."

func viewReferencesCSV(c *viewCSV, refs []arrhenius.Reference) {
	c.table("reference", "name", "aliases", "solute", "host", "D0_m2_s", "Q_J_mol", "valid_min_K", "valid_max_K",
		"range_note", "source", "from_memory", "spread_D_factor", "spread_Q_relative")
	memory := false
	for _, r := range refs {
		c.add("reference", r.Name, strings.Join(r.Aliases, ";"), r.Solute, r.Host, csvNumber(r.D0), csvNumber(r.Q),
			csvNumber(r.TMin), csvNumber(r.TMax), r.RangeNote, r.Source, viewBool(r.FromMemory),
			csvNumber(arrhenius.DefaultSpreadFactor), csvNumber(arrhenius.DefaultSpreadQ))
		memory = memory || r.FromMemory
	}
	if memory {
		viewCautionsCSV(c, []string{strings.Replace(viewReferenceCaution, "Rows marked *", "Rows with from_memory true", 1)})
	}
}

func viewReferencesText(w *bufio.Writer, refs []arrhenius.Reference, o TextOptions) {
	t := viewText{w, o}
	u := o.TempUnit
	t.line("", "Reference diffusion data (built-in table; D = D0·exp(−Q/(RT)))")
	var sources []string
	index := map[string]int{}
	memory := false
	tb := Table{Header: []string{"name", "solute in host", "D0 (m²/s)", "Q (kJ/mol)", "valid range", "source"},
		Align: []Align{Left, Left, Right, Right, Left, Left}, Indent: "  "}
	for _, r := range refs {
		k, ok := index[r.Source]
		if !ok {
			sources = append(sources, r.Source)
			k = len(sources)
			index[r.Source] = k
		}
		src := "[" + viewInt(k) + "]"
		if r.FromMemory {
			src += " *"
			memory = true
		}
		rng := "not stated"
		if r.TMin > 0 && r.TMax > 0 {
			// The ranges are approximate phase fields: whole degrees.
			rng = viewTempRange(r.TMin, r.TMax, u, 0)
		}
		tb.Add(r.Name, r.Solute+" in "+r.Host, viewGiven(r.D0), viewGiven(r.Q/1e3), rng, src)
	}
	w.WriteString("\n")
	tb.WriteTo(w)
	w.WriteString("\n")
	for i, s := range sources {
		t.line("  ["+viewInt(i+1)+"] ", s)
	}
	w.WriteString("\n")
	if len(refs) > 0 {
		t.line("  ", "Spread put on every row when it is used (backcalc, predict; --reference-spread and --reference-Q-uncertainty set it): D within a factor "+
			viewGiven(arrhenius.DefaultSpreadFactor)+" at the centre of the row's range and Q within "+viewGiven(100*arrhenius.DefaultSpreadQ)+
			" %, one standard uncertainty. Basis: "+arrhenius.SpreadBasis+".")
		w.WriteString("\n")
		t.line("  ", "Answers from these rows rest on published handbook values, not on a calibration of your own steel and furnace: calibrate (fickfit arrhenius on coupons treated at three or more temperatures) before deciding on parts.")
	}
	if memory {
		w.WriteString("\n")
		t.line("  ", viewReferenceCaution)
	}
}
