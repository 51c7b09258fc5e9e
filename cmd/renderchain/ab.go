package main

import (
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/abtest"
	"renderchain/models"
	"renderchain/render"
)

func abCommand() *cli.Command {
	return &cli.Command{
		Name:  "ab",
		Usage: "loudness-matched A/B clips of candidate builds, a sequence file and a listening page",
		UsageText: "renderchain ab --chain F --in DRY.wav --outdir DIR --variant \"LABEL: K=V …\" … [--blind --seed S]\n\n" +
			"   --variant \"as built:\"                  the chain as written\n" +
			"   --variant \"hotter Q2: fuzz.Q2.hfe=250\"  overrides, separated by spaces\n" +
			"   --variant \"germanium: @germanium.toml\"  another chain file (looked for in the working\n" +
			"                                           folder, then beside --chain), optionally followed\n" +
			"                                           by overrides",
		Description: "Renders every variant and the dry bypass from one take (in parallel), brings all clips to one\n" +
			"integrated loudness (ITU-R BS.1770-4) with gain alone — the --target-lufs, or lower if a clip\n" +
			"would otherwise pass the true-peak --ceiling — and writes into DIR: one WAV per clip, sequence.wav\n" +
			"(the clips back to back, every segment from the same point of the phrase, equal-power crossfades),\n" +
			"ab.json and index.html (a self-contained page that works offline; switching clips keeps the\n" +
			"position). Everything is built beside DIR and moved in when complete. --blind gives the clips\n" +
			"neutral labels in an order drawn from --seed and writes the key to a separate file.\n\n" +
			"The page also shows pictures of all variants together, each in its player's colour: the small-signal\n" +
			"response, the harmonics of a test sine (--sine-freq, --sine-level at the source), the same 40 ms of\n" +
			"every clip from the take's loudest half second, and each clip's long-term third-octave spectrum\n" +
			"(fig-*.png). A blind set gets none: they would tell the clips apart.",
		Flags: []cli.Flag{
			chainFlag,
			&cli.StringFlag{Name: "in", Aliases: []string{"i"}, Usage: "dry take (WAV, mono or stereo, 44.1–192 kHz), required"},
			&cli.StringFlag{Name: "outdir", Aliases: []string{"o"}, Usage: "folder for the set, required"},
			&cli.StringSliceFlag{Name: "variant", Aliases: []string{"V"}, Usage: "a candidate build `\"LABEL: K=V …\"` or \"LABEL: @FILE.toml [K=V …]\" (repeatable; none: the chain as written)"},
			setFlag,
			oversampleFlag,
			&cli.Float64Flag{Name: "target-lufs", Value: abtest.DefaultTargetLUFS, Usage: "integrated loudness every clip is brought to, `LUFS`"},
			&cli.Float64Flag{Name: "ceiling", Value: abtest.DefaultCeilingDBTP, Usage: "highest true peak any clip may reach, `dBTP`; lowers the common loudness when needed"},
			&cli.StringFlag{Name: "format", Value: render.FormatPCM24, Usage: "clip samples: pcm24, pcm16 or float32"},
			&cli.StringFlag{Name: "segment", Value: "4s", Usage: "sequence segment `LENGTH` (s or ms); 0: no sequence file"},
			&cli.StringFlag{Name: "crossfade", Value: "20ms", Usage: "equal-power crossfade between segments, `LENGTH` (at most half a segment)"},
			&cli.StringFlag{Name: "segment-start", Value: "0s", Usage: "point of the take every segment starts from, `TIME`"},
			&cli.IntFlag{Name: "rounds", Value: abtest.DefaultRounds, Usage: "times through the order in the sequence file"},
			&cli.StringFlag{Name: "order", Usage: "one round of the sequence, `LABELS` or clip numbers separated by commas (default: every clip once)"},
			&cli.BoolFlag{Name: "no-bypass", Usage: "leave out the dry bypass clip"},
			&cli.StringFlag{Name: "bypass-label", Value: abtest.DefaultBypassLabel, Usage: "label of the dry bypass clip"},
			&cli.BoolFlag{Name: "blind", Usage: "neutral labels (A, B, …) in a shuffled order; the key goes to a separate file"},
			&cli.Int64Flag{Name: "seed", Usage: "shuffle seed of a --blind set (the same seed gives the same set)"},
			&cli.StringFlag{Name: "key", Usage: "key `FILE` of a --blind set, outside DIR (default: DIR-key.json beside DIR)"},
			&cli.BoolFlag{Name: "no-pictures", Usage: "leave out the pictures of the variants together"},
			&cli.StringFlag{Name: "sine-freq", Value: "220Hz", Usage: "test sine of the harmonics picture, `FREQ`"},
			&cli.StringFlag{Name: "sine-level", Value: "100mV", Usage: "its amplitude at the source, `LEVEL`: 100mV (peak), 20mVpp, -20dBV"},
			&cli.StringFlag{Name: "plots", Usage: "folder of PNG plots to include: `DIR`/SLUG.TITLE.png for the variant whose label reads SLUG as a file name"},
			&cli.BoolFlag{Name: "force", Usage: "replace the clips of an earlier set in DIR"},
			&cli.IntFlag{Name: "jobs", Aliases: []string{"j"}, Usage: "variants rendered at once (default: one per core)"},
			quietFlag,
			&cli.BoolFlag{Name: "json", Usage: "print ab.json on stdout as well"},
		},
		Before: requireFlags("chain", "in", "outdir"),
		Action: abAction,
	}
}

func abAction(c *cli.Context) error {
	if c.NArg() > 0 {
		return usagef("ab takes no arguments (got %q); give variants with --variant", c.Args().First())
	}
	if c.Bool("blind") && !c.IsSet("seed") {
		return usagef("--blind needs --seed N: the shuffle is drawn from it, and the same seed gives the same set")
	}
	if !c.Bool("blind") && (c.IsSet("seed") || c.IsSet("key")) {
		return usagef("--seed and --key belong to a --blind set")
	}
	for _, name := range []string{"sine-freq", "sine-level"} {
		if c.IsSet(name) && (c.Bool("blind") || c.Bool("no-pictures")) {
			return usagef("--%s sets the harmonics picture, which a --blind set or --no-pictures does not get", name)
		}
	}
	pics := abtest.PictureOptions{On: !c.Bool("no-pictures")}
	var err error
	if pics.SineHz, err = parseFlag(c, "sine-freq", models.ParseFrequency); err != nil {
		return err
	}
	if pics.SineV, err = parseFlag(c, "sine-level", models.ParseAmplitude); err != nil {
		return err
	}
	var variants []abtest.Variant
	for _, spec := range c.StringSlice("variant") {
		v, err := abtest.ParseVariant(spec)
		if err != nil {
			return &usageError{msg: "--" + err.Error(), err: err}
		}
		variants = append(variants, v)
	}
	seq := abtest.SequenceOptions{Rounds: c.Int("rounds")}
	if seq.Segment, err = parseFlag(c, "segment", models.ParseSeconds); err != nil {
		return err
	}
	seq.Off = seq.Segment == 0
	if seq.Crossfade, err = parseFlag(c, "crossfade", models.ParseSeconds); err != nil {
		return err
	}
	if seq.Start, err = parseFlag(c, "segment-start", models.ParseSeconds); err != nil {
		return err
	}
	if s := c.String("order"); s != "" {
		seq.Order = strings.Split(s, ",")
	}
	ch, err := loadChain(c)
	if err != nil {
		return err
	}
	outs := newOutputs(c)
	prog, done := progress(c.Bool("quiet"), "rendering variants")
	set, err := abtest.Build(c.Context, abtest.Options{Outputs: outs,
		Chain: ch, ChainPath: c.String("chain"), Dry: c.String("in"), OutDir: c.String("outdir"),
		Variants: variants, NoBypass: c.Bool("no-bypass"), BypassLabel: c.String("bypass-label"),
		Oversample: c.Int("oversample"), TargetLUFS: c.Float64("target-lufs"), CeilingDBTP: c.Float64("ceiling"),
		Format: c.String("format"), Sequence: seq,
		Blind: c.Bool("blind"), Seed: c.Int64("seed"), KeyPath: c.String("key"), PlotDir: c.String("plots"), Pictures: pics,
		Force: c.Bool("force"), Jobs: c.Int("jobs"), Progress: prog,
	})
	done()
	var le *abtest.LabelError
	var ee *abtest.ExistsError
	switch {
	case errors.As(err, &le):
		return &usageError{msg: "--variant: " + err.Error(), err: err}
	case errors.As(err, &ee):
		return fmt.Errorf("%w (pass --force)", err)
	case err != nil:
		return err
	}
	noteChanged(c, outs)
	if c.Bool("json") {
		if err := printJSON(c, set); err != nil {
			return err
		}
	}
	if !c.Bool("quiet") {
		printAB(c.App.ErrWriter, set, c.String("outdir"))
	}
	fmt.Fprintln(c.App.ErrWriter, hearingCaution)
	return nil
}

// printAB writes the human summary of a set.
func printAB(w io.Writer, s *abtest.Set, dir string) {
	fmt.Fprintf(w, "%d clips from %s (%.2f s, %d Hz, %d ch) in %s\n", len(s.Variants), filepath.Base(s.Dry.File),
		s.Dry.Seconds, s.Dry.SampleRate, s.Dry.Channels, dir)
	asked := ""
	if s.CeilingLimited {
		asked = fmt.Sprintf(", held below the %.1f LUFS asked for", float64(s.RequestedLUFS))
	}
	fmt.Fprintf(w, "  every clip at %.2f LUFS (spread %.3f LU%s), true peaks at or under %.1f dBTP\n",
		float64(s.TargetLUFS), float64(s.SpreadLU), asked, float64(s.CeilingDBTP))
	width := 5
	for _, v := range s.Variants {
		width = max(width, len([]rune(v.Shown())))
	}
	fmt.Fprintf(w, "  %-*s  %9s  %7s  %11s  %s\n", width, "clip", "gain", "LUFS", "true peak", "file")
	for _, v := range s.Variants {
		flag := ""
		if v.Flag != "" {
			flag = "  <- " + v.Flag
		}
		fmt.Fprintf(w, "  %-*s  %+6.2f dB  %7.2f  %6.2f dBTP  %s%s\n", width, v.Shown(), float64(v.GainDB), float64(v.LUFS),
			float64(v.TruePeakDBTP), v.File, flag)
	}
	if q := s.Sequence; q != nil {
		fmt.Fprintf(w, "  %s: %d × [%s], %.3f s segments from %.3f s, %.0f ms crossfades (%.2f s)\n", q.File, q.Rounds,
			strings.Join(q.Order, " "), q.SegmentSeconds, q.StartSeconds, 1000*q.CrossfadeSeconds, float64(q.Frames)/float64(s.Dry.SampleRate))
	}
	fmt.Fprintf(w, "  page: %s (self-contained, works offline)\n", filepath.Join(dir, abtest.PageFile))
	if len(s.Pictures) > 0 {
		var files []string
		for _, p := range s.Pictures {
			files = append(files, p.File)
		}
		fmt.Fprintf(w, "  pictures: %s\n", strings.Join(files, " "))
	}
	if s.KeyFile != "" {
		fmt.Fprintf(w, "  key: %s (keep it from the listener; ab.json's gain_db hints at which clip was quiet)\n", s.KeyFile)
	}
	for _, warn := range s.Warnings { // a blind set's name clips by their neutral labels only
		fmt.Fprintln(w, "  warning: "+warn)
	}
}
