package sweep

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"github.com/corefall/corefall/popsynth"
)

// MaxTasks is the largest number of tasks a sweep may have.
const MaxTasks = 1_000_000

// Spec is a parsed sweep file: a base configuration, the grid of values to vary and the number of
// independent repeats of each grid cell.
type Spec struct {
	// Name labels the sweep file in messages (usually its path).
	Name string
	// Dir is the directory that relative core.table paths are taken from (the sweep file's
	// directory); "" for the working directory.
	Dir string
	// Base is the base configuration as YAML text, nested as in configs/default.yaml; empty for the
	// embedded default.
	Base []byte
	// Axes are the dimensions of the grid, outermost first.
	Axes []Axis
	// Repeats is the number of tasks (each with its own seed) per grid cell, at least 1.
	Repeats int
	// Text is the sweep file as read, kept in the manifest for provenance.
	Text string
}

// Axis is one dimension of the grid: a single key from vary, or the keys of the zip group, whose
// value lists have equal lengths and advance together.
type Axis struct {
	Keys []string
	// Values[k][j] is the j-th value of Keys[k].
	Values [][]Value
}

// Len returns the number of points along the axis.
func (a Axis) Len() int {
	if len(a.Values) == 0 {
		return 0
	}
	return len(a.Values[0])
}

// Value is one value of a varied key.
type Value struct {
	// Text is the value as a --set override takes it: "rapid", "0.0142", "[1.3, 2.3]".
	Text string
	// Label is the path-safe form used as the hive partition value and in the summary.
	Label string
	// Number is the value when IsNumber.
	Number   float64
	IsNumber bool
}

// fixedKeys are the config keys a sweep may not vary, with the reason.
var fixedKeys = map[string]string{
	"seed":                  "each task's seed is derived from the base seed and the task index; set seed in base and use repeats for independent seeds",
	"workers":               "it does not change a catalogue; the task runner chooses it",
	"output.path":           "the sweep chooses each task's part path",
	"output.format":         "a sweep always writes Parquet parts",
	"output.row_group_rows": "it does not change the rows; set it in base",
}

// ReadSpec reads and parses the sweep file at path.
func ReadSpec(path string) (*Spec, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("sweep: cannot read the sweep file: %w", err)
	}
	s, err := ParseSpec(path, data)
	if err != nil {
		return nil, err
	}
	if abs, err := filepath.Abs(filepath.Dir(path)); err == nil {
		s.Dir = abs
	}
	return s, nil
}

// ParseSpec parses a sweep file's text. name labels it in messages. Unknown keys, at the top level,
// in base or in vary and zip, are errors that give the line.
func ParseSpec(name string, data []byte) (*Spec, error) {
	s := &Spec{Name: name, Repeats: 1, Text: string(data)}
	var doc yaml.Node
	if err := yaml.Unmarshal(data, &doc); err != nil {
		return nil, fmt.Errorf("sweep: %s is not valid YAML: %w", name, err)
	}
	if doc.Kind == 0 || len(doc.Content) == 0 {
		return nil, fmt.Errorf("sweep: %s is empty; give at least a vary section, e.g.\nvary:\n  explosion.engine: [rapid, delayed]", name)
	}
	root := doc.Content[0]
	if root.Kind != yaml.MappingNode {
		return nil, fmt.Errorf("sweep: %s:%d: the sweep file must be a map with the keys base, vary, zip and repeats", name, root.Line)
	}
	known := knownKeys()
	var vary, zip *yaml.Node
	for i := 0; i+1 < len(root.Content); i += 2 {
		k, v := root.Content[i], root.Content[i+1]
		switch k.Value {
		case "base":
			if err := s.parseBase(v, known); err != nil {
				return nil, err
			}
		case "vary":
			vary = v
		case "zip":
			zip = v
		case "repeats":
			n, err := strconv.Atoi(v.Value)
			if v.Kind != yaml.ScalarNode || err != nil || n < 1 {
				return nil, fmt.Errorf("sweep: %s:%d: repeats = %q; want a whole number >= 1 (independent seeds per grid cell)", name, v.Line, v.Value)
			}
			s.Repeats = n
		default:
			return nil, fmt.Errorf("sweep: %s:%d: unknown key %q in the sweep file; allowed: base, vary, zip, repeats", name, k.Line, k.Value)
		}
	}
	varied := map[string]int{} // key -> axis index
	if vary != nil {
		if vary.Kind != yaml.MappingNode {
			return nil, fmt.Errorf("sweep: %s:%d: vary must map config keys to lists of values, e.g. explosion.engine: [rapid, delayed]", name, vary.Line)
		}
		for i := 0; i+1 < len(vary.Content); i += 2 {
			k, v := vary.Content[i], vary.Content[i+1]
			key, vals, err := s.parseKeyValues("vary", k, v, known)
			if err != nil {
				return nil, err
			}
			if _, dup := varied[key]; dup {
				return nil, fmt.Errorf("sweep: %s:%d: vary: key %q is listed twice", name, k.Line, key)
			}
			varied[key] = len(s.Axes)
			s.Axes = append(s.Axes, Axis{Keys: []string{key}, Values: [][]Value{vals}})
		}
	}
	if zip != nil {
		if err := s.parseZip(zip, varied, known); err != nil {
			return nil, err
		}
	}
	n := 1
	for _, a := range s.Axes {
		n *= a.Len()
		if n*s.Repeats > MaxTasks {
			return nil, fmt.Errorf("sweep: %s has more than %d tasks, the most allowed; split it into several sweeps", name, MaxTasks)
		}
	}
	if n*s.Repeats > MaxTasks {
		return nil, fmt.Errorf("sweep: %s has %d tasks (%d cells x %d repeats); at most %d are allowed", name, n*s.Repeats, n, s.Repeats, MaxTasks)
	}
	return s, nil
}

// parseBase checks the base section's keys against the config keys (with their lines) and keeps it
// as YAML text.
func (s *Spec) parseBase(n *yaml.Node, known map[string]bool) error {
	if n.Kind == yaml.ScalarNode && n.Tag == "!!null" {
		return nil
	}
	if n.Kind != yaml.MappingNode {
		return fmt.Errorf("sweep: %s:%d: base must be a config map, nested as in `corefall config defaults`", s.Name, n.Line)
	}
	var walk func(prefix string, n *yaml.Node) error
	walk = func(prefix string, n *yaml.Node) error {
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			key := k.Value
			if prefix != "" {
				key = prefix + "." + key
			}
			isLeaf, isKnown := known[key]
			switch {
			case !isKnown && !popsynth.IsSection(key):
				return fmt.Errorf("sweep: %s:%d: base: unknown config key %q%s", s.Name, k.Line, key, popsynth.KeyHint(key))
			case isKnown && isLeaf && v.Kind == yaml.MappingNode:
				return fmt.Errorf("sweep: %s:%d: base: %q holds a value, not a map of keys", s.Name, k.Line, key)
			case v.Kind == yaml.MappingNode:
				if err := walk(key, v); err != nil {
					return err
				}
			case !isKnown:
				return fmt.Errorf("sweep: %s:%d: base: %q is a section; give it keys such as %s", s.Name, k.Line, key, popsynth.SectionExample(key))
			}
			switch key {
			case "output.path":
				return fmt.Errorf("sweep: %s:%d: base: output.path is not allowed: the sweep writes each task's part to DIR/catalogue/.../part-NNNNN.parquet", s.Name, k.Line)
			case "output.format":
				if !strings.EqualFold(strings.TrimSpace(v.Value), "parquet") {
					return fmt.Errorf("sweep: %s:%d: base: output.format = %q; a sweep writes Parquet parts (a hive-partitioned dataset), so leave it out or set parquet", s.Name, k.Line, v.Value)
				}
			}
		}
		return nil
	}
	if err := walk("", n); err != nil {
		return err
	}
	text, err := yaml.Marshal(n)
	if err != nil {
		return fmt.Errorf("sweep: %s: base: %w", s.Name, err)
	}
	s.Base = text
	return nil
}

// parseKeyValues reads one `key: [values...]` entry of vary or zip.
func (s *Spec) parseKeyValues(section string, k, v *yaml.Node, known map[string]bool) (string, []Value, error) {
	key := strings.TrimSpace(k.Value)
	if _, ok := known[key]; !ok {
		if popsynth.IsSection(key) {
			return "", nil, fmt.Errorf("sweep: %s:%d: %s: %q is a section; vary one of its keys, such as %s", s.Name, k.Line, section, key, popsynth.SectionExample(key))
		}
		return "", nil, fmt.Errorf("sweep: %s:%d: %s: unknown config key %q%s", s.Name, k.Line, section, key, popsynth.KeyHint(key))
	}
	if why, fixed := fixedKeys[key]; fixed {
		return "", nil, fmt.Errorf("sweep: %s:%d: %s: %s cannot be varied: %s", s.Name, k.Line, section, key, why)
	}
	if v.Kind != yaml.SequenceNode {
		return "", nil, fmt.Errorf("sweep: %s:%d: %s: %s must have a list of values, e.g. %s: [a, b]", s.Name, v.Line, section, key, key)
	}
	if len(v.Content) == 0 {
		return "", nil, fmt.Errorf("sweep: %s:%d: %s: %s has an empty list; give at least one value", s.Name, v.Line, section, key)
	}
	vals := make([]Value, len(v.Content))
	seen := map[string]string{}
	for j, e := range v.Content {
		val, err := parseValue(e)
		if err != nil {
			return "", nil, fmt.Errorf("sweep: %s:%d: %s: %s value %d: %v", s.Name, e.Line, section, key, j+1, err)
		}
		if prev, dup := seen[val.Label]; dup {
			if prev == val.Text {
				return "", nil, fmt.Errorf("sweep: %s:%d: %s: %s lists the value %s twice", s.Name, e.Line, section, key, val.Text)
			}
			return "", nil, fmt.Errorf("sweep: %s:%d: %s: %s values %q and %q give the same directory name %q; make them differ in letters or digits",
				s.Name, e.Line, section, key, prev, val.Text, val.Label)
		}
		seen[val.Label] = val.Text
		vals[j] = val
	}
	return key, vals, nil
}

// parseZip reads the zip group: either a map of key -> list, or a list of keys of vary.
func (s *Spec) parseZip(n *yaml.Node, varied map[string]int, known map[string]bool) error {
	var ax Axis
	switch n.Kind {
	case yaml.MappingNode:
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			key, vals, err := s.parseKeyValues("zip", k, v, known)
			if err != nil {
				return err
			}
			if _, dup := varied[key]; dup {
				return fmt.Errorf("sweep: %s:%d: zip: %s is also in vary; a key may be varied in one place only", s.Name, k.Line, key)
			}
			if ax.Len() > 0 && len(vals) != ax.Len() {
				return fmt.Errorf("sweep: %s:%d: zip: %s has %d values but %s has %d; zipped lists must have equal lengths",
					s.Name, v.Line, key, len(vals), ax.Keys[0], ax.Len())
			}
			varied[key] = -1
			ax.Keys = append(ax.Keys, key)
			ax.Values = append(ax.Values, vals)
		}
		if len(ax.Keys) > 0 {
			s.Axes = append(s.Axes, ax)
		}
		return nil
	case yaml.SequenceNode:
		// The named vary axes become one axis, at the place of the first of them.
		first := -1
		drop := map[int]bool{}
		for _, e := range n.Content {
			key := strings.TrimSpace(e.Value)
			idx, ok := varied[key]
			if e.Kind != yaml.ScalarNode || !ok || idx < 0 {
				return fmt.Errorf("sweep: %s:%d: zip: %q is not a key of vary; a zip list names keys of vary (or write zip as a map of key: [values])", s.Name, e.Line, e.Value)
			}
			if drop[idx] {
				return fmt.Errorf("sweep: %s:%d: zip: %s is listed twice", s.Name, e.Line, key)
			}
			a := s.Axes[idx]
			if ax.Len() > 0 && a.Len() != ax.Len() {
				return fmt.Errorf("sweep: %s:%d: zip: %s has %d values but %s has %d; zipped lists must have equal lengths",
					s.Name, e.Line, key, a.Len(), ax.Keys[0], ax.Len())
			}
			if first < 0 {
				first = idx
			}
			drop[idx] = true
			ax.Keys = append(ax.Keys, a.Keys...)
			ax.Values = append(ax.Values, a.Values...)
		}
		if first < 0 {
			return nil
		}
		var axes []Axis
		for i, a := range s.Axes {
			switch {
			case i == first:
				axes = append(axes, ax)
			case !drop[i]:
				axes = append(axes, a)
			}
		}
		s.Axes = axes
		return nil
	}
	return fmt.Errorf("sweep: %s:%d: zip must be a map of key: [values] or a list of keys of vary", s.Name, n.Line)
}

// parseValue turns one YAML list element into a Value.
func parseValue(n *yaml.Node) (Value, error) {
	switch n.Kind {
	case yaml.ScalarNode:
		switch n.ShortTag() {
		case "!!null":
			return Value{}, errors.New("null is not a value; give the value, or leave the key out of vary")
		case "!!int", "!!float":
			var f float64
			if err := n.Decode(&f); err != nil {
				return Value{}, fmt.Errorf("%q is not a number: %v", n.Value, err)
			}
			if math.IsInf(f, 0) || math.IsNaN(f) {
				return Value{}, fmt.Errorf("%q is not a finite number", n.Value)
			}
			t := formatNumber(f)
			return Value{Text: t, Label: t, Number: f, IsNumber: true}, nil
		case "!!bool":
			var b bool
			if err := n.Decode(&b); err != nil {
				return Value{}, err
			}
			t := strconv.FormatBool(b)
			return Value{Text: t, Label: t}, nil
		default:
			if strings.ContainsAny(n.Value, "\n\r") {
				return Value{}, fmt.Errorf("%q spans several lines; a value must be one line", n.Value)
			}
			return Value{Text: n.Value, Label: safeLabel(n.Value)}, nil
		}
	case yaml.SequenceNode:
		texts := make([]string, len(n.Content))
		labels := make([]string, len(n.Content))
		for i, e := range n.Content {
			if e.Kind != yaml.ScalarNode {
				return Value{}, errors.New("a list value may hold only plain values, not lists or maps")
			}
			v, err := parseValue(e)
			if err != nil {
				return Value{}, err
			}
			if strings.Contains(v.Text, ",") {
				return Value{}, fmt.Errorf("list element %q contains a comma", v.Text)
			}
			texts[i], labels[i] = v.Text, v.Label
		}
		label := strings.Join(labels, "_")
		if label == "" {
			label = "empty"
		}
		return Value{Text: "[" + strings.Join(texts, ", ") + "]", Label: shorten(label)}, nil
	}
	return Value{}, errors.New("a value must be a plain value or a list of plain values, not a map")
}

// formatNumber writes f in the shortest form that reads back exactly, without an exponent in the
// usual range (so 200000, not 2e+05, and 0.0001).
func formatNumber(f float64) string {
	if f == 0 {
		return "0"
	}
	if a := math.Abs(f); a >= 1e-6 && a < 1e15 {
		return strconv.FormatFloat(f, 'f', -1, 64)
	}
	return strconv.FormatFloat(f, 'g', -1, 64)
}

// safeLabel makes a value usable as one path component and a hive partition value: letters, digits
// and . + - stay, anything else becomes '_'; the result never starts with '.' or '_' (hidden to
// most readers) and is never empty.
func safeLabel(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '.', r == '+', r == '-':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	out := b.String()
	if out == "" {
		return "empty"
	}
	if out[0] == '.' || out[0] == '_' {
		out = "v" + out
	}
	return shorten(out)
}

// shorten keeps a label within a safe directory-name length, ending a long one with a hash of it.
func shorten(s string) string {
	const max = 96
	if len(s) <= max {
		return s
	}
	h := sha256.Sum256([]byte(s))
	return s[:max-9] + "-" + hex.EncodeToString(h[:4])
}

// ColumnName returns the name a varied key has as a hive partition key and as a summary column:
// dots and dashes become underscores, and "cfg_" is put in front when the name is taken by a
// catalogue or summary column.
func ColumnName(key string) string {
	name := strings.NewReplacer(".", "_", "-", "_").Replace(key)
	if reservedColumns()[name] {
		return "cfg_" + name
	}
	return name
}

// knownKeys maps every config key to true (the value only records presence, as a leaf).
func knownKeys() map[string]bool {
	m := map[string]bool{}
	for _, k := range popsynth.KnownKeys() {
		m[k] = true
	}
	return m
}
