package popsynth

import (
	"bytes"
	"fmt"
	"os"
	"regexp"
	"sort"
	"strings"

	"github.com/spf13/viper"
	"go.yaml.in/yaml/v3"

	"github.com/corefall/corefall/configs"
)

// EnvPrefix is the prefix of environment variables that set configuration keys:
// COREFALL_IMF_LAW sets imf.law.
const EnvPrefix = "COREFALL_"

// Sources lists where configuration comes from, lowest precedence first after the embedded default:
// a YAML file, the environment, and key=value overrides.
type Sources struct {
	File    string   // path of a YAML file; "" for none
	Data    []byte   // contents of File, when already in memory (File then only names it)
	Environ []string // environment as from os.Environ; only COREFALL_* entries are read
	Set     []string // "key=value" overrides, as given to --set
}

// Load builds the effective configuration: embedded default < file < environment < Set. Unknown
// keys, values of the wrong type and out-of-range values are errors that name the key (with the
// nearest valid key for a misspelling), the value and what is allowed.
func Load(src Sources) (Config, error) {
	var cfg Config
	v, err := layered(src)
	if err != nil {
		return cfg, err
	}
	if err := v.UnmarshalExact(&cfg); err != nil {
		return cfg, decodeError(v, err)
	}
	if err := cfg.Validate(); err != nil {
		return cfg, err
	}
	return cfg, nil
}

// Default returns the embedded default configuration.
func Default() Config {
	cfg, err := Load(Sources{})
	if err != nil {
		panic("popsynth: embedded default config is invalid: " + err.Error())
	}
	return cfg
}

// KnownKeys returns every configuration key, sorted.
func KnownKeys() []string {
	keys := make([]string, 0, 64)
	for k := range defaultKeys() {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// KeyHint returns a hint for an unknown config key: `; did you mean "x"?` naming the nearest valid
// key (Levenshtein distance), or a pointer to `corefall config defaults`.
func KeyHint(key string) string { return suggestion(key, defaultKeys()) }

// IsSection reports whether key names a section of keys, such as imf or core.builtin.
func IsSection(key string) bool {
	for k := range defaultKeys() {
		if strings.HasPrefix(k, key+".") {
			return true
		}
	}
	return false
}

// SectionExample returns up to three keys of a section, for messages.
func SectionExample(section string) string { return exampleKeys(section, defaultKeys()) }

// defaultKeys returns the set of leaf keys of the embedded default config, with a flag telling
// whether the key holds a list.
func defaultKeys() map[string]bool {
	var root yaml.Node
	if err := yaml.Unmarshal(configs.Default, &root); err != nil {
		panic("popsynth: embedded default config is not YAML: " + err.Error())
	}
	keys := make(map[string]bool)
	var walk func(prefix string, n *yaml.Node)
	walk = func(prefix string, n *yaml.Node) {
		if n.Kind == yaml.DocumentNode {
			for _, c := range n.Content {
				walk(prefix, c)
			}
			return
		}
		if n.Kind != yaml.MappingNode {
			keys[prefix] = n.Kind == yaml.SequenceNode
			return
		}
		for i := 0; i+1 < len(n.Content); i += 2 {
			k := n.Content[i].Value
			if prefix != "" {
				k = prefix + "." + k
			}
			walk(k, n.Content[i+1])
		}
	}
	walk("", &root)
	return keys
}

func layered(src Sources) (*viper.Viper, error) {
	v := viper.New()
	v.SetConfigType("yaml")
	if err := v.ReadConfig(bytes.NewReader(configs.Default)); err != nil {
		return nil, fmt.Errorf("config: embedded default: %w", err)
	}
	known := defaultKeys()
	// Every key gets its default as a viper default too, so that a file which sets a whole
	// section only partly keeps the other keys of the section.
	for k := range known {
		v.SetDefault(k, v.Get(k))
	}
	if src.File != "" || src.Data != nil {
		data := src.Data
		if data == nil {
			var err error
			if data, err = os.ReadFile(src.File); err != nil {
				return nil, fmt.Errorf("config: cannot read config file: %w", err)
			}
		}
		if err := checkFileKeys(src.File, data, known); err != nil {
			return nil, err
		}
		if err := v.MergeConfig(bytes.NewReader(data)); err != nil {
			return nil, fmt.Errorf("config: %s: %w", src.File, err)
		}
	}
	for _, kv := range src.Environ {
		name, val, ok := strings.Cut(kv, "=")
		if !ok || !strings.HasPrefix(name, EnvPrefix) {
			continue
		}
		key, ok := envKey(name, known)
		if !ok {
			return nil, fmt.Errorf("config: environment variable %s does not name a config key%s; unset it, or see `corefall config defaults` for the keys",
				name, suggestion(strings.ToLower(strings.TrimPrefix(name, EnvPrefix)), known))
		}
		v.Set(key, listValue(val, known[key]))
	}
	for _, kv := range src.Set {
		key, val, ok := strings.Cut(kv, "=")
		if !ok {
			return nil, fmt.Errorf("config: --set %q: want key=value, e.g. --set imf.law=salpeter", kv)
		}
		key = strings.TrimSpace(key)
		if _, ok := known[key]; !ok {
			return nil, fmt.Errorf("config: --set %s: unknown config key %q%s", kv, key, suggestion(key, known))
		}
		v.Set(key, listValue(strings.TrimSpace(val), known[key]))
	}
	return v, nil
}

// envKey maps COREFALL_IMF_SAMPLE_MIN to imf.sample_min. Underscores are ambiguous (they stand for
// dots and are also part of key names), so the match is made against the known keys.
func envKey(name string, known map[string]bool) (string, bool) {
	want := strings.ToUpper(strings.TrimPrefix(name, EnvPrefix))
	for k := range known {
		if strings.ToUpper(strings.ReplaceAll(k, ".", "_")) == want {
			return k, true
		}
	}
	return "", false
}

// listValue turns "[a, b]" or "a,b" into a []string for list keys, which the weakly typed decoder
// then converts element by element; scalars pass through.
func listValue(val string, isList bool) any {
	if !isList {
		return val
	}
	val = strings.TrimSpace(val)
	val = strings.TrimSuffix(strings.TrimPrefix(val, "["), "]")
	if strings.TrimSpace(val) == "" {
		return []string{}
	}
	parts := strings.Split(val, ",")
	for i := range parts {
		parts[i] = strings.TrimSpace(parts[i])
	}
	return parts
}

// checkFileKeys reports the first key in a YAML file that corefall does not know, with its line.
func checkFileKeys(path string, data []byte, known map[string]bool) error {
	var root yaml.Node
	if err := yaml.Unmarshal(data, &root); err != nil {
		return fmt.Errorf("config: %s is not valid YAML: %w", path, err)
	}
	sections := make(map[string]bool)
	for k := range known {
		for i := strings.Index(k, "."); i >= 0; i = nextDot(k, i) {
			sections[k[:i]] = true
		}
	}
	var check func(prefix string, n *yaml.Node) error
	check = func(prefix string, n *yaml.Node) error {
		switch n.Kind {
		case yaml.DocumentNode:
			for _, c := range n.Content {
				if err := check(prefix, c); err != nil {
					return err
				}
			}
			return nil
		case yaml.MappingNode:
			if prefix != "" && !sections[prefix] {
				return fmt.Errorf("config: %s:%d: key %q holds a value, not a section of keys", path, n.Line, prefix)
			}
			for i := 0; i+1 < len(n.Content); i += 2 {
				kn := n.Content[i]
				key := kn.Value
				if prefix != "" {
					key = prefix + "." + key
				}
				if _, leaf := known[key]; !leaf && !sections[key] {
					return fmt.Errorf("config: %s:%d: unknown config key %q%s", path, kn.Line, key, suggestion(key, known))
				}
				if err := check(key, n.Content[i+1]); err != nil {
					return err
				}
			}
			return nil
		default:
			if sections[prefix] {
				return fmt.Errorf("config: %s:%d: %q is a section; give it keys such as %s", path, n.Line, prefix, exampleKeys(prefix, known))
			}
			return nil
		}
	}
	return check("", &root)
}

func nextDot(s string, i int) int {
	j := strings.Index(s[i+1:], ".")
	if j < 0 {
		return -1
	}
	return i + 1 + j
}

func exampleKeys(section string, known map[string]bool) string {
	var ks []string
	for k := range known {
		if strings.HasPrefix(k, section+".") {
			ks = append(ks, k)
		}
	}
	sort.Strings(ks)
	if len(ks) > 3 {
		ks = ks[:3]
	}
	return strings.Join(ks, ", ")
}

// suggestion returns `; did you mean "x"?` for the known key nearest to key, or "".
func suggestion(key string, known map[string]bool) string {
	best, bestD := "", 1<<30
	for k := range known {
		d := editDistance(key, k)
		// Also compare with the last component alone, so "sampel_min" finds "imf.sample_min".
		if i := strings.LastIndex(k, "."); i >= 0 && !strings.Contains(key, ".") {
			if d2 := editDistance(key, k[i+1:]); d2 < d {
				d = d2
			}
		}
		if d < bestD || (d == bestD && k < best) {
			best, bestD = k, d
		}
	}
	if best == "" || bestD > max(2, len(key)/3) {
		return "; see `corefall config defaults` for the valid keys"
	}
	return fmt.Sprintf("; did you mean %q?", best)
}

// editDistance is the Levenshtein distance between a and b.
func editDistance(a, b string) int {
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(a); i++ {
		cur[0] = i
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(b)]
}

var decodeProblem = regexp.MustCompile(`'([^']*)' cannot parse value as '([^']+)'`)

// decodeError rewrites the decoder's complaint about a value of the wrong type into one that names
// the key, the value and the type allowed.
func decodeError(v *viper.Viper, err error) error {
	m := decodeProblem.FindStringSubmatch(err.Error())
	if m == nil {
		return fmt.Errorf("config: %v", err)
	}
	key := m[1]
	want := map[string]string{
		"int": "a whole number", "int64": "a whole number", "uint64": "a whole number >= 0",
		"float64": "a number", "bool": "true or false", "string": "a word",
	}[m[2]]
	if want == "" {
		want = "a value of type " + m[2]
	}
	if strings.HasPrefix(m[2], "[]") || strings.Contains(key, "[") {
		key = key[:max(0, strings.Index(key, "["))]
		want = "a list of numbers, e.g. [0.0002, 0.002]"
	}
	return &KeyError{Key: key, Value: fmt.Sprintf("%q", fmt.Sprint(v.Get(key))), Allowed: "must be " + want}
}

// YAML returns the configuration as YAML, the form stored in every catalogue's metadata.
func (c Config) YAML() string {
	var buf bytes.Buffer
	enc := yaml.NewEncoder(&buf)
	enc.SetIndent(2)
	if err := enc.Encode(c); err != nil {
		panic("popsynth: config does not marshal: " + err.Error())
	}
	return buf.String()
}

// ParseYAMLConfig decodes a configuration from YAML text (as stored in catalogue metadata), strictly,
// on top of the embedded default, and validates it. name labels the text in error messages.
func ParseYAMLConfig(name, text string) (Config, error) {
	return Load(Sources{File: name, Data: []byte(text)})
}
