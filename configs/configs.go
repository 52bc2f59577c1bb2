// Package configs holds corefall's embedded default configuration and the example configurations
// shipped with the program.
//
// The default is compiled into the binary so that `corefall run` works with no file at all; every
// key a user may set appears in it, with its default value and a comment.
package configs

import _ "embed"

// Default is the text of default.yaml: every configuration key with its default value.
//
//go:embed default.yaml
var Default []byte
