package chains

import (
	"embed"
	"fmt"
	"io/fs"
	"path"
	"sort"
	"strings"
	"sync"

	"github.com/BurntSushi/toml"

	"renderchain/models"
)

//go:embed templates/*.toml
var templateFS embed.FS

// Template is a built-in stage: a parts list with default knob settings.
type Template struct {
	Name, About string
	// Environment marks a template that models what a build plugs into
	// (environment = true in its file): the pickup, the amplifier input.
	Environment bool
	// Supply marks a supply-network template (supply = true in its file):
	// it goes in a chain's [power] table, between the ideal supply and v+,
	// and names the nodes emf and v+ instead of in and out.
	Supply bool
	Knobs  []KnobInfo
	Parts  []*Part
	src    string
}

// KnobInfo describes a template knob.
type KnobInfo struct {
	Name    string
	Default float64
	About   string
}

type rawTemplate struct {
	About string                     `toml:"about"`
	Env   bool                       `toml:"environment"`
	Sup   bool                       `toml:"supply"`
	Knobs map[string]rawTemplateKnob `toml:"knobs"`
	Parts []map[string]any           `toml:"parts"`
}

type rawTemplateKnob struct {
	Default float64 `toml:"default"`
	About   string  `toml:"about"`
}

// Templates returns the built-in stage templates, sorted by name.
func Templates() ([]*Template, error) {
	entries, err := fs.ReadDir(templateFS, "templates")
	if err != nil {
		return nil, err
	}
	var out []*Template
	for _, e := range entries {
		t, err := LoadTemplate(strings.TrimSuffix(e.Name(), ".toml"))
		if err != nil {
			return nil, err
		}
		out = append(out, t)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].Name < out[j].Name })
	return out, nil
}

// TemplateNames lists the built-in template names.
func TemplateNames() []string {
	entries, _ := fs.ReadDir(templateFS, "templates")
	var s []string
	for _, e := range entries {
		s = append(s, strings.TrimSuffix(e.Name(), ".toml"))
	}
	sort.Strings(s)
	return s
}

// templateCache holds every built-in template parsed once (they are
// embedded, so a parse's result never changes): a chain file naming a
// template in each of many stages costs one parse, not one per stage.
var templateCache sync.Map // name → *cachedTemplate

type cachedTemplate struct {
	once sync.Once
	t    *Template
	err  error
}

// LoadTemplate returns the named built-in template, parsed on first use
// and cached; each call returns its own copy (parts and knobs can be
// changed without touching the cache).
func LoadTemplate(name string) (*Template, error) {
	if _, err := fs.Stat(templateFS, path.Join("templates", name+".toml")); err != nil {
		return parseTemplate(name) // unknown: its error, and nothing cached
	}
	v, _ := templateCache.LoadOrStore(name, &cachedTemplate{})
	c := v.(*cachedTemplate)
	c.once.Do(func() { c.t, c.err = parseTemplate(name) })
	if c.err != nil {
		if _, ok := c.err.(*Error); ok { // a fresh error: callers fill in File and Where
			e := *c.err.(*Error)
			return nil, &e
		}
		return nil, c.err
	}
	t := *c.t
	t.Knobs = append([]KnobInfo(nil), c.t.Knobs...)
	t.Parts = make([]*Part, len(c.t.Parts))
	for i, p := range c.t.Parts {
		t.Parts[i] = clonePart(p)
	}
	return &t, nil
}

// parseTemplate parses the named built-in template.
func parseTemplate(name string) (*Template, error) {
	file := "template " + name
	b, err := templateFS.ReadFile(path.Join("templates", name+".toml"))
	if err != nil {
		return nil, &Error{Msg: fmt.Sprintf("unknown template %q (built-in: %s)%s", name, strings.Join(TemplateNames(), ", "), didYouMean(name, TemplateNames()))}
	}
	var raw rawTemplate
	md, err := toml.Decode(string(b), &raw)
	if err != nil {
		return nil, &Error{File: file, Msg: firstLine(err.Error())}
	}
	if und := undecoded(md); len(und) > 0 {
		return nil, &Error{File: file, Msg: fmt.Sprintf("unknown key %q", und[0].String())}
	}
	loc := newLocator(string(b))
	t := &Template{Name: name, About: raw.About, Environment: raw.Env, Supply: raw.Sup, src: string(b)}
	for k, v := range raw.Knobs {
		if err := models.RotationRange.Check(v.Default); err != nil {
			return nil, &Error{File: file, Line: loc.find(-1, k), Msg: fmt.Sprintf("knob %s default %g is outside 0…1", k, v.Default)}
		}
		t.Knobs = append(t.Knobs, KnobInfo{Name: k, Default: v.Default, About: v.About})
	}
	sort.Slice(t.Knobs, func(i, j int) bool { return t.Knobs[i].Name < t.Knobs[j].Name })
	for _, rp := range raw.Parts {
		p, err := parsePart(rp)
		if err != nil {
			ref, _ := rp["ref"].(string)
			return nil, &Error{File: file, Line: loc.find(-1, `"`+ref+`"`), Msg: err.Error()}
		}
		t.Parts = append(t.Parts, p)
	}
	return t, nil
}

// clonePart returns a deep copy of p.
func clonePart(p *Part) *Part {
	q := *p
	q.Pins = map[string]string{}
	for k, v := range p.Pins {
		q.Pins[k] = v
	}
	q.Params = map[string]float64{}
	for k, v := range p.Params {
		q.Params[k] = v
	}
	q.Windings = append([]Winding(nil), p.Windings...)
	q.Positions = append([]Position(nil), p.Positions...) // read-only after parsing
	return &q
}

// expandTemplate makes a stage from a template with knob settings and
// value overrides. line locates a needle in the chain file for messages
// (nil: none).
func expandTemplate(name, id string, knobs map[string]float64, values map[string]any, line func(...string) int) (*Stage, error) {
	t, err := LoadTemplate(name)
	if err != nil {
		return nil, err
	}
	at := func(needles ...string) int {
		if line == nil {
			return 0
		}
		return line(needles...)
	}
	st := &Stage{ID: id, Template: name, About: t.About, Environment: t.Environment, Knobs: map[string]float64{}, KnobAbout: map[string]string{}, index: -1}
	for _, k := range t.Knobs {
		st.Knobs[k.Name] = k.Default
		st.KnobAbout[k.Name] = k.About
	}
	for k, v := range knobs {
		if _, ok := st.Knobs[k]; !ok {
			return nil, &Error{Line: at(k), Msg: fmt.Sprintf("template %s has no knob %q (knobs: %s)%s", name, k, listOr(keys(st.Knobs)), didYouMean(k, keys(st.Knobs)))}
		}
		st.Knobs[k] = v
	}
	for _, p := range t.Parts {
		st.Parts = append(st.Parts, clonePart(p))
	}
	for _, ref := range keys(values) {
		p := st.part(ref)
		if p == nil {
			return nil, &Error{Line: at(ref), Msg: fmt.Sprintf("template %s has no part %q (parts: %s)%s", name, ref, strings.Join(st.refs(), ", "), didYouMean(ref, st.refs()))}
		}
		v := values[ref]
		tbl, isTable := v.(map[string]any)
		if !isTable {
			tbl = map[string]any{"value": v}
		}
		if err := p.apply(tbl, false); err != nil {
			return nil, &Error{Line: at(ref), Msg: err.Error()}
		}
		if err := p.complete(); err != nil {
			return nil, &Error{Line: at(ref), Msg: err.Error()}
		}
	}
	if err := st.checkKnobs(); err != nil {
		return nil, &Error{Msg: err.Error()}
	}
	return st, nil
}

func (st *Stage) part(ref string) *Part {
	for _, p := range st.Parts {
		if p.Ref == ref {
			return p
		}
	}
	return nil
}

func (st *Stage) refs() []string {
	var s []string
	for _, p := range st.Parts {
		s = append(s, p.Ref)
	}
	return s
}
