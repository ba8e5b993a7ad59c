package fit

import (
	"fmt"
	"sort"
	"strings"
	"sync"
)

// Info describes a registered model: everything auto-selection,
// diagnostics, report labels and CSV columns need to know about it, so
// that a model registered once (in its own file) is known everywhere
// without a second list.
type Info struct {
	// Name is the flag name (--model NAME, the "model" key of results),
	// lower case.
	Name string
	// Title is the model in words for people: "constant surface
	// concentration (erf solution)". Reports and the text view use it.
	Title string
	// SemiInfinite tells that the model assumes a semi-infinite body: the
	// penetration checks (diffusion length against the data and the
	// specimen thickness) apply to its fits.
	SemiInfinite bool
	// InAuto tells that --model auto (SelectModel) tries the model.
	InAuto bool
	// Rank orders the models wherever they are listed: auto-selection
	// candidates, parameter columns of reports. Lower first, then by name.
	Rank int
	// Couple tells that the model describes positions on both sides of an
	// interface (two bodies joined): when a profile's positions cross zero,
	// auto-selection tries only such models.
	Couple bool
	// Applies, when not nil, tells whether auto-selection should try the
	// model on a profile: d holds its depths (X), values (Y) and specimen
	// thickness (0 when not known). note, when not "", is added to the
	// selection's notes (why the model was or was not tried).
	Applies func(d *Data) (ok bool, note string)
	// Params are the model's parameters in the order of its parameter
	// vector; Register fills them from the model when left nil.
	Params []Param
}

var (
	registryMu sync.RWMutex
	registry   = map[string]entry{}
)

type entry struct {
	info Info
	mk   func() Model
}

// Register makes a model known by its name, as database/sql.Register does
// for drivers: closed-form models call it from an init function in their
// own file. mk builds the model; it may be nil for a model that needs
// settings of its own to be built (the numerical model of fit/numeric),
// which is then described (Lookup, Models) but not built by NewModel.
// Register panics when the name is empty or already taken.
func Register(info Info, mk func() Model) {
	info.Name = strings.ToLower(strings.TrimSpace(info.Name))
	if info.Name == "" {
		panic("fit: Register of a model without a name")
	}
	if info.Params == nil && mk != nil {
		info.Params = mk().Params()
	}
	registryMu.Lock()
	defer registryMu.Unlock()
	if _, dup := registry[info.Name]; dup {
		panic("fit: Register called twice for model " + info.Name)
	}
	registry[info.Name] = entry{info, mk}
}

// Lookup returns the description of the registered model name.
func Lookup(name string) (Info, bool) {
	registryMu.RLock()
	defer registryMu.RUnlock()
	e, ok := registry[strings.ToLower(strings.TrimSpace(name))]
	return e.info, ok
}

// Models describes every registered model, by Rank and then name.
func Models() []Info {
	registryMu.RLock()
	out := make([]Info, 0, len(registry))
	for _, e := range registry {
		out = append(out, e.info)
	}
	registryMu.RUnlock()
	sort.Slice(out, func(i, j int) bool {
		if out[i].Rank != out[j].Rank {
			return out[i].Rank < out[j].Rank
		}
		return out[i].Name < out[j].Name
	})
	return out
}

// NewModel returns the registered model with the given flag name.
func NewModel(name string) (Model, error) {
	registryMu.RLock()
	e, ok := registry[strings.ToLower(strings.TrimSpace(name))]
	registryMu.RUnlock()
	if !ok || e.mk == nil {
		return nil, fmt.Errorf("%w: unknown model %q (valid: %s)", ErrBadInput, name, strings.Join(ModelNames(), ", "))
	}
	return e.mk(), nil
}

// ModelNames lists the models NewModel can build, sorted by name.
func ModelNames() []string {
	registryMu.RLock()
	defer registryMu.RUnlock()
	names := make([]string, 0, len(registry))
	for n, e := range registry {
		if e.mk != nil {
			names = append(names, n)
		}
	}
	sort.Strings(names)
	return names
}
