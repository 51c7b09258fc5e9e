package chains

import (
	"errors"
	"fmt"
	"io"
	"os"

	"renderchain/models"
)

// Limits on a chain file's text, checked by CheckText before the TOML
// parser sees it. The parser keeps every nesting level and every prefix of
// a dotted key in memory and recurses once per level, so a small hostile
// file (30 000 nested inline tables in 120 KB; a 30 000-part dotted key
// in 60 KB) exhausts memory or the stack. Each bound is far above what a
// chain needs: the built-in chains and templates are under 8 KB, 100 lines
// of at most 300 bytes, nest 6 levels (a transformer's windings, a
// switch's positions) and hold at most 400 keys of at most 3 parts.
const (
	MaxFileBytes = 1 << 20  // bytes in a chain file (1 MiB)
	MaxLineBytes = 16 << 10 // bytes on one line (16 KiB)
	MaxDepth     = 32       // open brackets ([ and {) at one point
	MaxKeyParts  = 8        // parts of one dotted key or table name (a.b.c is 3)
	MaxKeys      = 20000    // key = value assignments in the file
)

// Limits on a parsed chain, checked by CheckSize before the circuit is
// built: the solvers work on dense matrices whose memory grows with the
// square of the circuit's size and whose time grows with its cube, so a
// chain of 100 000 parts would ask for some 80 GB. A pedal has under 100
// parts and 50 nodes; a long chain of pedals under 1 000 parts. The part
// and node bounds are where a chain is still usable, measured by
// engine's BenchmarkChainSize on the project's 2-core machine: an RC ladder
// of 1 000 parts (507 nodes) builds in 2 ms, solves its DC operating point
// in 22 ms and renders one second at the default 4× oversampling in 44 s;
// at 2 000 parts (1 003 nodes) the render took 209 s, so the bound was
// lowered from 2 000 to 1 000. Nonlinear parts cost far more per part (the
// Newton solve at the root grows with the cube of the device ports): 16
// buffered two-transistor fuzz pedals in a row, 320 parts, took 237 s.
const (
	MaxStages      = 256
	MaxParts       = 1000
	MaxNodes       = 1000
	MaxMatrixBytes = 64 << 20 // the estimate of CheckSize (64 MiB)
)

// ErrLimit is wrapped by every *LimitError.
var ErrLimit = errors.New("beyond the limits of a chain file")

// LimitError reports a chain file, or the circuit it describes, beyond one
// of the limits above: the file, the line where there is one, and a
// one-line message naming the quantity, its value and the bound.
type LimitError struct {
	File  string
	Line  int
	What  string // the quantity: "file size", "line length", "nesting", ...
	Value int64  // how much the file has (for nesting and line length: where the scan stopped, at least this)
	Limit int64
	Unit  string
}

func (e *LimitError) Error() string {
	loc := e.File
	if e.Line > 0 {
		loc += fmt.Sprintf(":%d", e.Line)
	}
	return fmt.Sprintf("%s: %s: %d %s, beyond the limit of %d for chain files", loc, e.What, e.Value, e.Unit, e.Limit)
}

// Unwrap returns ErrLimit.
func (e *LimitError) Unwrap() error { return ErrLimit }

// ReadFile reads a chain file, at most MaxFileBytes of it: a larger file,
// or an endless one (a device, a pipe that never closes is another
// matter: it blocks like any read), is refused without reading the rest.
func ReadFile(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", &Error{File: path, Msg: "cannot read chain file: " + errText(err)}
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil && st.IsDir() {
		return "", &Error{File: path, Msg: "is a folder, not a chain file"}
	}
	b, err := io.ReadAll(io.LimitReader(f, MaxFileBytes+1))
	if err != nil {
		return "", &Error{File: path, Msg: "cannot read chain file: " + errText(err)}
	}
	if len(b) > MaxFileBytes {
		return "", &LimitError{File: path, What: "file size", Value: int64(len(b)), Limit: MaxFileBytes, Unit: "bytes (at least)"}
	}
	return string(b), nil
}

// CheckText scans a chain file's text against the limits above before any
// parsing. It understands TOML's four kinds of string (basic, literal and
// their multi-line forms, TOML v1.0.0 §String) and comments, so brackets,
// dots and equals signs inside them are not counted; it checks nothing
// else of the syntax, which the parser does after it. Nesting counts open
// brackets, so an array of tables header ([[stage]]) counts 2 while it is
// read. name is used in messages.
func CheckText(name, src string) error {
	_, err := scanText(name, src)
	return err
}

// textStats is what scanText measured of a text that is within limits.
type textStats struct {
	lines, maxLine, maxDepth, maxParts, keys int
}

func scanText(name, src string) (textStats, error) {
	var st textStats
	if len(src) > MaxFileBytes {
		return st, &LimitError{File: name, What: "file size", Value: int64(len(src)), Limit: MaxFileBytes, Unit: "bytes"}
	}
	line, lineStart := 1, 0
	depth, keys, dots := 0, 0, 0
	// eol handles the newline at i: the line that ends there is checked.
	eol := func(i int) error {
		n := i - lineStart
		if n > MaxLineBytes {
			return &LimitError{File: name, Line: line, What: "line length", Value: int64(n), Limit: MaxLineBytes, Unit: "bytes"}
		}
		st.maxLine = max(st.maxLine, n)
		line++
		lineStart = i + 1
		return nil
	}
	for i := 0; i < len(src); {
		c := src[i]
		switch {
		case c == '\n':
			if err := eol(i); err != nil {
				return st, err
			}
			dots = 0
			i++
		case c == '#': // comment: to the end of the line
			for i < len(src) && src[i] != '\n' {
				i++
			}
		case c == '"' || c == '\'':
			multi := i+2 < len(src) && src[i+1] == c && src[i+2] == c
			if multi {
				i += 3
			} else {
				i++
			}
			for i < len(src) {
				d := src[i]
				if d == '\\' && c == '"' { // an escape in a basic string
					if i+1 < len(src) && src[i+1] == '\n' {
						if err := eol(i + 1); err != nil {
							return st, err
						}
					}
					i += 2
					continue
				}
				if d == '\n' {
					if !multi {
						break // unterminated: the parser reports it
					}
					if err := eol(i); err != nil {
						return st, err
					}
					i++
					continue
				}
				if d == c && (!multi || i+2 < len(src) && src[i+1] == c && src[i+2] == c) {
					if multi {
						i += 3
						// Up to two more quotes may end a multi-line string.
						for k := 0; k < 2 && i < len(src) && src[i] == c; k++ {
							i++
						}
					} else {
						i++
					}
					break
				}
				i++
			}
		case c == '[' || c == '{':
			depth++
			st.maxDepth = max(st.maxDepth, depth)
			if depth > MaxDepth {
				return st, &LimitError{File: name, Line: line, What: "nesting of arrays and tables", Value: int64(depth), Limit: MaxDepth, Unit: "levels (at least)"}
			}
			dots = 0
			i++
		case c == ']' || c == '}':
			if depth > 0 {
				depth--
			}
			dots = 0
			i++
		case c == '=':
			keys++
			if keys > MaxKeys {
				return st, &LimitError{File: name, Line: line, What: "number of keys", Value: int64(keys), Limit: MaxKeys, Unit: "keys (at least)"}
			}
			dots = 0
			i++
		case c == ',':
			dots = 0
			i++
		case c == '.':
			// Dots between two separators: the parts of a dotted key or
			// table name (a number or a time has at most one).
			dots++
			st.maxParts = max(st.maxParts, dots+1)
			if dots+1 > MaxKeyParts {
				return st, &LimitError{File: name, Line: line, What: "dotted key", Value: int64(dots + 1), Limit: MaxKeyParts, Unit: "parts (at least)"}
			}
			i++
		default:
			i++
		}
	}
	if err := eol(len(src)); err != nil {
		return st, err
	}
	st.lines, st.keys = line-1, keys
	if len(src) > 0 && src[len(src)-1] != '\n' {
		st.lines = line
	}
	return st, nil
}

// CheckSize checks a parsed chain against MaxStages, MaxParts, MaxNodes
// and MaxMatrixBytes before anything is built or allocated for it. The
// node count is an upper bound (every pin name of a stage counted as its
// own node, plus a series-resistance node per diode, a buffer node per
// buffered stage and the shared ones); matrix memory is estimated as in
// circuitBytes. Flatten (and so Build) calls it first, so every command
// that builds a chain (after Load and the --set overrides) is bounded in
// one place.
func (ch *Chain) CheckSize() error {
	if len(ch.Stages) > MaxStages {
		return &LimitError{File: ch.File, What: "number of stages", Value: int64(len(ch.Stages)), Limit: MaxStages, Unit: "stages"}
	}
	parts := 0
	for _, st := range ch.PartStages() { // the [power] network's parts too
		parts += len(st.Parts)
	}
	if parts > MaxParts { // before counting nodes, which allocates
		return &LimitError{File: ch.File, What: "number of parts", Value: int64(parts), Limit: MaxParts, Unit: "parts"}
	}
	_, _, nodes, branches, ports := ch.sizes()
	if nodes > MaxNodes {
		return &LimitError{File: ch.File, What: "number of nodes", Value: int64(nodes), Limit: MaxNodes, Unit: "nodes (upper bound)"}
	}
	if b := circuitBytes(nodes, branches, ports); b > MaxMatrixBytes {
		return &LimitError{File: ch.File, What: "solver matrix memory", Value: int64(b), Limit: MaxMatrixBytes, Unit: "bytes (estimate)"}
	}
	return nil
}

// sizes counts what Build will make of the chain, as upper bounds: nodes
// (ground included), branch currents and ports (one per linear two-
// terminal part, two per pot, diode with its series resistance and
// transistor, one leak resistor per node at most, and the output load).
func (ch *Chain) sizes() (stages, parts, nodes, branches, ports int) {
	nodes = 4                            // gnd, v+, in, out
	branches = 2                         // the signal source and the supply
	ports = 1                            // the output load
	for _, st := range ch.PartStages() { // the [power] network too (its emf counted as its out)
		local := map[string]bool{}
		if st.Buffer {
			nodes++
			branches++
		}
		for _, p := range st.Parts {
			for _, n := range p.Pins {
				switch n {
				case "gnd", "v+", "in", "out":
				default:
					local[n] = true
				}
			}
			// Upper bounds of what models.Circuit.AddPart makes of each
			// kind: internal nodes, branch rows and adaptor ports.
			switch p.Kind {
			case Inductor:
				branches++ // a branch row in AC and transient analysis
				ports++
			case Diode:
				nodes++ // the junction behind a series resistance
				ports += 2
			case NPN, PNP:
				nodes++ // the base behind a base resistance
				ports += 3
			case NJFET, PJFET, NMOSFET, PMOSFET, Pot:
				ports += 2
			case OpAmp:
				nodes += 2 // the gain node, the drive behind the output resistance
				branches++ // the output buffer
				ports += 7 // rin, gm, rg, cg, two limiters, rout
			case Transformer:
				w := len(p.Windings)
				nodes += 2 * w      // behind each winding's resistance and leakage
				branches += 2*w + 1 // leakage and magnetising inductors, the ideal transformer's rows
				ports += 2*w + 1
			case Switch:
				for _, pos := range p.Positions {
					ports += len(pos.Connect) // a contact resistor each (one position is built)
				}
			default:
				ports++
			}
		}
		parts += len(st.Parts)
		nodes += len(local) + 1 // and the stage's own out
	}
	ports += nodes
	return len(ch.Stages), parts, nodes, branches, ports
}

// CheckCircuit checks a built circuit against MaxNodes and MaxMatrixBytes
// with its exact node, branch and port counts, for circuits that did not
// come from a chain (CheckSize covers those before Build).
func CheckCircuit(c *models.Circuit) error {
	if len(c.Nodes) > MaxNodes {
		return &LimitError{File: c.Name, What: "number of nodes", Value: int64(len(c.Nodes)), Limit: MaxNodes, Unit: "nodes"}
	}
	branches, ports := 0, 0
	for _, e := range c.Elements {
		switch e.Kind {
		case models.VoltageSourceKind, models.BufferKind:
			branches++
		case models.InductorKind:
			branches++
			ports++
		case models.BJTKind:
			ports += 2
		default:
			ports++
		}
	}
	if b := circuitBytes(len(c.Nodes), branches, ports); b > MaxMatrixBytes {
		return &LimitError{File: c.Name, What: "solver matrix memory", Value: int64(b), Limit: MaxMatrixBytes, Unit: "bytes (estimate)"}
	}
	return nil
}

// circuitBytes estimates the largest dense working set of the solvers for
// a circuit of n nodes (ground included), b branch currents and p ports,
// in bytes of float64: the modified-nodal system and its LU factors
// (2·d², d = n−1+b unknowns; Ho, Ruehli and Brennan 1975), and the wave
// digital adaptor's port-to-port and node-to-port response matrices
// (p² + (n+b)·p). It is computed in float64 so that no size overflows.
func circuitBytes(n, b, p int) float64 {
	d := float64(n - 1 + b)
	fp := float64(p)
	return 8 * (2*d*d + fp*fp + float64(n+b)*fp)
}
