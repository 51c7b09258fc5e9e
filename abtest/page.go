package abtest

import (
	_ "embed"
	"encoding/json"
	"html"
	"path/filepath"
	"strings"

	"renderchain/plotting"
	"renderchain/report"
)

//go:embed page.html
var pageTemplate string

// pageClip is what the page knows of a clip; a blind set leaves out
// everything that tells the clips apart (settings, gain, true peak and
// loudness range: a peaky dry take keeps a higher true peak at the same
// loudness).
type pageClip struct {
	Label        string        `json:"label"`
	File         string        `json:"file"`
	LUFS         report.Level  `json:"lufs"`
	TruePeakDBTP *report.Level `json:"true_peak_dbtp,omitempty"`
	GainDB       *report.Level `json:"gain_db,omitempty"`
	LRA          *report.Level `json:"loudness_range_lu,omitempty"`
	Settings     []string      `json:"settings,omitempty"`
	ChainFile    string        `json:"chain_file,omitempty"`
	Bypass       bool          `json:"bypass,omitempty"`
	Flag         string        `json:"flag,omitempty"`
	Plots        []Plot        `json:"plots"`
	// Colour is the clip's colour in the set's pictures (plotting.Hex of
	// its position), shown beside its player.
	Colour string `json:"colour"`
}

type pageData struct {
	Title          string       `json:"title"`
	Chain          string       `json:"chain"`
	Dry            string       `json:"dry"`
	Seconds        float64      `json:"seconds"`
	SampleRate     int          `json:"sample_rate"`
	Channels       int          `json:"channels"`
	TargetLUFS     report.Level `json:"target_lufs"`
	RequestedLUFS  report.Level `json:"requested_target_lufs"`
	CeilingDBTP    report.Level `json:"ceiling_dbtp"`
	CeilingLimited bool         `json:"ceiling_limited"`
	Blind          bool         `json:"blind"`
	HearingCaution string       `json:"hearing_caution"`
	Clips          []pageClip   `json:"clips"`
	Sequence       *Sequence    `json:"sequence"`
	Warnings       []string     `json:"warnings"`
	Pictures       []Plot       `json:"pictures"`
}

// Page returns the listening page of a set: one HTML file with its styles,
// script and data inline, which loads nothing but the clips, the sequence
// file and the plots, by relative path, so the folder works offline and from
// anywhere. It has a player per clip; switching clips (buttons, keys 1–9)
// keeps the playback position and the play state; a table gives each clip's
// settings, loudness, true peak, gain and loudness range; a blind set's page
// shows neutral labels and loudness only until the key file is loaded into it.
func Page(s *Set) ([]byte, error) {
	title := "A/B set: " + s.Chain
	if s.Blind {
		title = "Blind A/B set"
	}
	d := pageData{
		Title: title, Chain: s.Chain, Dry: filepath.Base(s.Dry.File), Seconds: s.Dry.Seconds,
		SampleRate: s.Dry.SampleRate, Channels: s.Dry.Channels,
		TargetLUFS: s.TargetLUFS, RequestedLUFS: s.RequestedLUFS, CeilingDBTP: s.CeilingDBTP,
		CeilingLimited: s.CeilingLimited, Blind: s.Blind, HearingCaution: HearingCaution,
		Sequence: s.Sequence, Warnings: s.Warnings, // a blind set's name clips by their neutral labels only
		Pictures: s.Pictures,
	}
	if d.Pictures == nil {
		d.Pictures = []Plot{}
	}
	for i := range s.Variants {
		c := &s.Variants[i]
		pc := pageClip{Label: c.Shown(), File: c.File, LUFS: c.LUFS, Flag: c.Flag, Plots: c.Plots, Colour: plotting.Hex(i)}
		if !s.Blind {
			g, l, tp := c.GainDB, c.LRA, c.TruePeakDBTP
			pc.GainDB, pc.LRA, pc.TruePeakDBTP = &g, &l, &tp
			pc.Settings, pc.Bypass = c.Settings, c.Bypass
			if c.ChainFile != "" {
				pc.ChainFile = filepath.Base(c.ChainFile)
			}
		}
		if pc.Plots == nil {
			pc.Plots = []Plot{}
		}
		d.Clips = append(d.Clips, pc)
	}
	// encoding/json escapes <, > and & (and U+2028/9), so the data cannot
	// close the script element it sits in.
	b, err := json.Marshal(d)
	if err != nil {
		return nil, err
	}
	// One pass over the template: substituted text is not searched again.
	r := strings.NewReplacer("{{TITLE}}", html.EscapeString(title), "{{DATA}}", string(b))
	return []byte(r.Replace(pageTemplate)), nil
}
