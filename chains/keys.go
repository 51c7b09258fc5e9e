package chains

import (
	"fmt"
	"strings"

	"github.com/BurntSushi/toml"
)

// tableKeys are the keys each table of a chain file takes, for "did you
// mean" on an unknown one ("" is the top level).
var tableKeys = map[string][]string{
	"":       {"name", "supply", "temperature", "oversample", "nets", "input", "output", "power", "stage"},
	"input":  {"peak", "source"},
	"output": {"load", "full_scale"},
	"stage":  {"id", "template", "about", "buffer", "environment", "knobs", "values", "parts"},
	"power":  {"template", "about", "knobs", "values", "parts"},
}

// partKeys lists the keys a part of the given kind takes.
func partKeys(kind PartKind) []string {
	ks := keys(commonKeys)
	for k := range deviceParams[kind] {
		ks = append(ks, k)
	}
	return ks
}

// unknownChainKey is the error of a key the decoder did not place: the
// line it is written on (inside the [[stage]] blocks too) and the key it
// is most likely a slip for.
func unknownChainKey(file string, loc *locator, k toml.Key) error {
	table := strings.Join(k[:len(k)-1], ".")
	key := k[len(k)-1]
	line := loc.findKey(table, key)
	if table == "stage" {
		line = loc.findBlockKey(key)
	}
	return &Error{File: file, Line: line, Msg: fmt.Sprintf("unknown key %q%s", k.String(), didYouMean(key, tableKeys[table]))}
}

// findBlockKey returns the first line, inside any [[stage]] block, on which
// key is assigned, or 0.
func (l *locator) findBlockKey(key string) int {
	if l == nil {
		return 0
	}
	for k := range l.stages {
		from, to := l.block(k)
		for i := from + 1; i < to; i++ {
			t := strings.TrimSpace(l.lines[i])
			if rest, ok := strings.CutPrefix(t, key); ok && strings.HasPrefix(strings.TrimSpace(rest), "=") {
				return i + 1
			}
		}
	}
	return 0
}

// findAssign returns the line in block k on which key is assigned as a
// word of its own ("C1 = …" inside a values table), or 0.
func (l *locator) findAssign(k int, key string) int {
	if l == nil {
		return 0
	}
	from, to := l.block(k)
	for i := from; i < to; i++ {
		ln := l.lines[i]
		for at := 0; ; {
			j := strings.Index(ln[at:], key)
			if j < 0 {
				break
			}
			j += at
			before := j == 0 || !wordByte(ln[j-1])
			rest := strings.TrimSpace(ln[j+len(key):])
			if before && strings.HasPrefix(rest, "=") && !strings.HasPrefix(rest, "==") {
				return i + 1
			}
			at = j + len(key)
		}
	}
	return 0
}

// wordByte reports a byte that can be part of a key or ref.
func wordByte(b byte) bool {
	return b == '_' || b == '-' || b >= '0' && b <= '9' || b >= 'a' && b <= 'z' || b >= 'A' && b <= 'Z'
}
