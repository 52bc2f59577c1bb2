package popsynth

import (
	"fmt"
	"reflect"
	"sort"
	"strings"
	"unicode"

	"github.com/corefall/corefall/remnant"
)

// BuiltinConfig holds the parameters of the builtin core model under core.builtin, keyed by the
// snake_case form of the fields of remnant.Builtin (HeCoreExponent is core.builtin.he_core_exponent).
// The embedded default lists every one with remnant.DefaultBuiltin's value; DEVELOPERS.md explains
// each relation and parameter.
type BuiltinConfig map[string]float64

// snakeCase turns a Go field name into a config key: HeCoreMaxFraction -> he_core_max_fraction,
// MSWindFraction -> ms_wind_fraction, COBaseFraction -> co_base_fraction.
func snakeCase(name string) string {
	var b strings.Builder
	r := []rune(name)
	for i, c := range r {
		if unicode.IsUpper(c) && i > 0 {
			prevLower := unicode.IsLower(r[i-1])
			nextLower := i+1 < len(r) && unicode.IsLower(r[i+1])
			if prevLower || (nextLower && unicode.IsUpper(r[i-1])) {
				b.WriteByte('_')
			}
		}
		b.WriteRune(unicode.ToLower(c))
	}
	return b.String()
}

// builtinFields maps each config key to the index of its field in remnant.Builtin.
func builtinFields() map[string]int {
	t := reflect.TypeFor[remnant.Builtin]()
	m := make(map[string]int, t.NumField())
	for i := range t.NumField() {
		f := t.Field(i)
		if f.IsExported() && f.Type.Kind() == reflect.Float64 {
			m[snakeCase(f.Name)] = i
		}
	}
	return m
}

// Model returns the builtin core model with these parameters, starting from remnant.DefaultBuiltin.
func (c BuiltinConfig) Model() remnant.Builtin {
	b := remnant.DefaultBuiltin()
	v := reflect.ValueOf(&b).Elem()
	fields := builtinFields()
	for k, x := range c {
		if i, ok := fields[k]; ok {
			v.Field(i).SetFloat(x)
		}
	}
	return b
}

func (c BuiltinConfig) validate() error {
	fields := builtinFields()
	keys := make(map[string]bool, len(fields))
	for k := range fields {
		keys["core.builtin."+k] = false
	}
	for k := range c {
		if _, ok := fields[k]; !ok {
			return fmt.Errorf("config: unknown config key %q%s", "core.builtin."+k, suggestion("core.builtin."+k, keys))
		}
	}
	if err := c.Model().Validate(); err != nil {
		return fmt.Errorf("config: core.builtin: %w", err)
	}
	return nil
}

// DefaultBuiltinYAML returns the core.builtin section of configs/default.yaml as it must read:
// every parameter of remnant.DefaultBuiltin, sorted by key. A test keeps the two equal.
func DefaultBuiltinYAML() string {
	b := remnant.DefaultBuiltin()
	v := reflect.ValueOf(b)
	fields := builtinFields()
	keys := make([]string, 0, len(fields))
	for k := range fields {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var s strings.Builder
	s.WriteString("  builtin:\n")
	for _, k := range keys {
		fmt.Fprintf(&s, "    %s: %v\n", k, v.Field(fields[k]).Float())
	}
	return s.String()
}
