package report

import (
	"bytes"
	"strings"
	"testing"
)

// The method notes are product text and cite their sources without marks.
// What in those citations was written from memory and not checked against
// a copy (the notes cite each work without these details):
//
//   - Diffusion models: the chapters of Crank (1975) holding the closed-form
//     solutions, 2–4 (from memory).
//   - Intervals: Bates & Watts (1988) §6.1 and the sections of Efron &
//     Tibshirani (1993) (from memory).
//   - Confidence band of a curve: Seber & Wild (1989) §5.1 (from memory).
//   - Lot comparison: the section of Draper & Smith (1998) on the extra sum
//     of squares (from memory).
//   - Back-calculation: Fieller (1954), the title and pages 175–185 (from
//     memory).
//   - Rounding: the place of the rounding rule in the Particle Data Group's
//     Review of Particle Physics, its introduction (from memory).
func TestMethodNotesCiteWithoutMarks(t *testing.T) {
	for _, n := range MethodNotes() {
		if n.Topic == "" || n.Text == "" || n.Source == "" {
			t.Errorf("method note %+v lacks a topic, text or source", n)
		}
		for _, mark := range []string{"memory", "not checked", "unchecked"} {
			if strings.Contains(strings.ToLower(n.Text+" "+n.Source), mark) {
				t.Errorf("method note %q carries the mark %q: %s", n.Topic, mark, n.Source)
			}
		}
	}
	// And as printed in the report's Methods section.
	res, _ := runCampaign(t, 1)
	var b bytes.Buffer
	if err := res.WriteHTML(&b, CampaignOptions{}); err != nil {
		t.Fatal(err)
	}
	h := b.String()
	i, j := strings.Index(h, `<section id="methods"`), strings.Index(h, `<section id="cautions"`)
	if i < 0 || j < i {
		t.Fatal("no Methods section in the HTML report")
	}
	methods := h[i:j]
	if strings.Contains(methods, "memory") || !strings.Contains(methods, "Crank") || !strings.Contains(methods, "Fieller") {
		t.Errorf("Methods section: %s", methods)
	}
}
