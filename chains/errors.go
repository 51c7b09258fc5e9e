package chains

import (
	"errors"
	"fmt"
	"strings"
)

// ErrChain is the sentinel every *Error wraps when it has no underlying
// error of its own.
var ErrChain = errors.New("chain file error")

// Error is a fault in a chain file or template: the file, the line where
// there is one, what it concerns (a key, a stage, a part) and why.
type Error struct {
	File  string
	Line  int
	Where string
	Msg   string
	Err   error // the underlying error (a models value error), if any
}

// Unwrap returns the underlying error, else ErrChain.
func (e *Error) Unwrap() error {
	if e.Err != nil {
		return e.Err
	}
	return ErrChain
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	b.WriteString(": ")
	if e.Where != "" {
		b.WriteString(e.Where)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return oneLine(b.String())
}

// oneLine keeps a message on one line even when a name quoted from the
// file or the command line holds a line break.
func oneLine(s string) string { return strings.NewReplacer("\r", `\r`, "\n", `\n`).Replace(s) }

// locator finds the line a key or part sits on in the source text, for
// error messages. TOML decoding keeps no positions for semantic errors, so
// it searches the text: stage k's block runs from its k-th [[stage]]
// header to the next table header.
type locator struct {
	lines  []string
	stages []int // 0-based line index of each [[stage]] header
	power  int   // 0-based line index of the [power] header, −1 if none
}

// powerBlock is the block index of the [power] table for find and block.
const powerBlock = -2

func newLocator(src string) *locator {
	l := &locator{lines: strings.Split(src, "\n"), power: -1}
	for i, ln := range l.lines {
		t := strings.TrimSpace(ln)
		if strings.HasPrefix(t, "[[stage]]") {
			l.stages = append(l.stages, i)
		}
		if strings.HasPrefix(t, "[power]") && l.power < 0 {
			l.power = i
		}
	}
	return l
}

// header returns the 0-based line index of block k's header, or −1.
func (l *locator) header(k int) int {
	switch {
	case k == powerBlock:
		return l.power
	case k >= 0 && k < len(l.stages):
		return l.stages[k]
	}
	return -1
}

// block returns the line range [from, to) of stage k (k = powerBlock: the
// [power] table), or of the whole file for any other k.
func (l *locator) block(k int) (int, int) {
	if l == nil {
		return 0, 0
	}
	from := l.header(k)
	if from < 0 {
		return 0, len(l.lines)
	}
	to := len(l.lines)
	for i := from + 1; i < len(l.lines); i++ {
		t := strings.TrimSpace(l.lines[i])
		if strings.HasPrefix(t, "[") && !strings.HasPrefix(t, "[ ") && strings.HasSuffix(t, "]") && !strings.Contains(t, "=") {
			to = i
			break
		}
	}
	return from, to
}

// find returns the 1-based line in stage k's block (k < 0: anywhere) that
// contains every needle, or the block's first line, or 0.
func (l *locator) find(k int, needles ...string) int {
	if l == nil {
		return 0
	}
	from, to := l.block(k)
	for i := from; i < to; i++ {
		ln := l.lines[i]
		if c := strings.Index(ln, "#"); c >= 0 && !strings.Contains(ln[:c], "\"") {
			ln = ln[:c]
		}
		all := true
		for _, n := range needles {
			if !strings.Contains(ln, n) {
				all = false
				break
			}
		}
		if all {
			return i + 1
		}
	}
	return l.header(k) + 1
}

// findKey returns the line on which a top-level or table key is assigned.
func (l *locator) findKey(table, key string) int {
	if l == nil {
		return 0
	}
	in := table == ""
	for i, ln := range l.lines {
		t := strings.TrimSpace(ln)
		if strings.HasPrefix(t, "[") && strings.HasSuffix(t, "]") && !strings.Contains(t, "=") {
			in = t == "["+table+"]"
			continue
		}
		if in && (strings.HasPrefix(t, key+" ") || strings.HasPrefix(t, key+"=")) {
			return i + 1
		}
	}
	return 0
}
