package profile

import (
	"fmt"
	"strings"
	"unicode"
)

// metaEntry is one metadata item as read: a "# key: value" line or a
// key/value pair of worksheet cells.
type metaEntry struct {
	key, value string
	line       int // 1-based line or row
	col        int // 0-based column of the value cell (worksheets); -1 for text files
}

// metaSet is the metadata of one file or sheet, in file order.
type metaSet struct {
	entries []metaEntry
}

// Canonical metadata keys interpreted by the readers. Any other key is
// only kept in Profile.Meta.
var metaAliases = map[string]string{
	"id": "id", "lot": "lot", "material": "material", "quantity": "quantity", "value": "value",
	"temperature": "temperature", "temp": "temperature",
	"time": "time", "duration": "time",
	"thickness":         "thickness",
	"temperature_sigma": "temperature_sigma", "temp_sigma": "temperature_sigma",
	"sigma_temperature": "temperature_sigma", "sigma_t": "temperature_sigma",
}

// metaHasUnit lists canonical keys whose value is a quantity with a unit.
var metaHasUnit = map[string]bool{
	"temperature": true, "time": true, "thickness": true, "temperature_sigma": true,
}

// parseMetaLine reads a metadata line "# key: value" (any number of '#',
// key made of letters, digits, spaces, '_', '-', '.', '(', ')', '[', ']',
// '%', '°', '/'). ok is false for a plain comment.
func parseMetaLine(line string) (key, value string, ok bool) {
	s := strings.TrimSpace(line)
	if !strings.HasPrefix(s, "#") {
		return "", "", false
	}
	s = strings.TrimSpace(strings.TrimLeft(s, "#"))
	return splitKeyValue(s)
}

// splitKeyValue splits "key: value" at the first colon.
func splitKeyValue(s string) (key, value string, ok bool) {
	i := strings.IndexByte(s, ':')
	if i <= 0 {
		return "", "", false
	}
	key, value = strings.TrimSpace(s[:i]), strings.TrimSpace(s[i+1:])
	if !isKey(key) || strings.HasPrefix(value, "//") { // "see http://…" is prose
		return "", "", false
	}
	return key, value, true
}

// isKey reports whether k can be a metadata key: it starts with a letter,
// is at most 40 characters, and has no characters that mark prose or code.
func isKey(k string) bool {
	if k == "" || len(k) > 40 {
		return false
	}
	for i, r := range k {
		switch {
		case unicode.IsLetter(r):
		case i == 0:
			return false
		case unicode.IsDigit(r) || strings.ContainsRune(" _-.()[]%°/µ", r):
		default:
			return false
		}
	}
	return true
}

// meaning returns the canonical key an entry sets ("" for other keys) and
// the unit written in the key ("temperature_C: 925" → "temperature", "C").
func meaning(key string) (canon, unit string) {
	if c, ok := metaAliases[normKey(key)]; ok {
		return c, ""
	}
	root, unit := splitHeader(key)
	if c, ok := metaAliases[normKey(root)]; ok && metaHasUnit[c] && unit != "" {
		return c, unit
	}
	return "", ""
}

// add appends an entry; a key given twice is an error naming both places.
func (m *metaSet) add(e metaEntry, org origin) error {
	c, _ := meaning(e.key)
	for _, o := range m.entries {
		oc, _ := meaning(o.key)
		if (c != "" && c == oc) || strings.EqualFold(o.key, e.key) {
			return org.errAt(e.line, e.col, "", errorf(ErrMetadata,
				"metadata %s given twice (also at %s)", quote(e.key), org.place(o.line, o.col)),
				"keep one of them")
		}
	}
	m.entries = append(m.entries, e)
	return nil
}

// get returns the value of a canonical key and whether it was given.
func (m *metaSet) get(canon string) (metaEntry, bool) {
	for _, e := range m.entries {
		if c, _ := meaning(e.key); c == canon && e.value != "" {
			return e, true
		}
	}
	return metaEntry{}, false
}

// apply copies the metadata into p: interpreted keys into their fields
// (converted to SI), every key into p.Meta.
func (m *metaSet) apply(p *Profile, org origin) error {
	if p.Meta == nil && len(m.entries) > 0 {
		p.Meta = make(map[string]string, len(m.entries))
	}
	for _, e := range m.entries {
		p.Meta[strings.ToLower(e.key)] = e.value
		if e.value == "" {
			continue
		}
		if err := setField(p, e); err != nil {
			c, _ := meaning(e.key)
			return org.errAt(e.line, e.col, "", fmt.Errorf("metadata %s: %w", quote(e.key), err),
				fmt.Sprintf("write e.g. %q", metaExample(c, org.sheet != "")))
		}
	}
	return nil
}

// setField interprets one entry.
func setField(p *Profile, e metaEntry) error {
	c, unit := meaning(e.key)
	v := e.value
	if unit != "" {
		v += " " + unit
	}
	var err error
	switch c {
	case "id":
		p.ID = e.value
	case "lot":
		p.Lot = e.value
	case "material":
		p.Material = e.value
	case "quantity":
		p.Quantity = e.value
	case "temperature":
		p.Temperature, err = ParseTemperature(v)
	case "time":
		p.Time, err = ParseDuration(v)
	case "temperature_sigma":
		p.TemperatureSigma, err = ParseTemperatureDelta(v)
	case "thickness":
		p.Thickness, err = ParseLength(v)
		if err == nil && p.Thickness == 0 {
			err = errorf(ErrValue, "thickness is zero")
		}
	}
	return err
}

// metaExample shows a well-formed entry for a canonical key.
func metaExample(canon string, sheet bool) string {
	ex := map[string]string{
		"temperature": "temperature: 925 C", "time": "time: 4 h",
		"thickness": "thickness: 12 mm", "temperature_sigma": "temperature_sigma: 3 K",
	}[canon]
	if ex == "" {
		ex = "key: value"
	}
	if sheet {
		return ex
	}
	return "# " + ex
}
