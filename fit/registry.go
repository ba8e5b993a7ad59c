package fit

import (
	"fmt"
	"sort"
	"strings"
)

// registry maps a model's flag name to a constructor. Each closed-form model
// registers itself in an init function in its own file.
var registry = map[string]func() Model{}

func register(name string, mk func() Model) { registry[name] = mk }

// NewModel returns the closed-form model with the given flag name.
func NewModel(name string) (Model, error) {
	mk, ok := registry[strings.ToLower(strings.TrimSpace(name))]
	if !ok {
		return nil, fmt.Errorf("%w: unknown model %q (valid: %s)", ErrBadInput, name, strings.Join(ModelNames(), ", "))
	}
	return mk(), nil
}

// ModelNames lists the registered closed-form models, sorted.
func ModelNames() []string {
	names := make([]string, 0, len(registry))
	for n := range registry {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}
