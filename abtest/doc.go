// Package abtest makes listening sets for comparing candidate builds of a
// chain: the same dry take rendered through each variant, the clips brought
// to one loudness, a sequence file that plays them back to back from the
// same point of the phrase, an optional blind shuffle with a separate key,
// and a self-contained listening page. Loudness is measured by package
// analyze.
//
// # Variants
//
// A variant is a label and --set overrides on the command's chain
// (ParseVariant reads "LABEL: KEY=VALUE …"; an empty list is the chain as
// written), or another chain file, "LABEL: @other.toml [KEY=VALUE …]". The
// file of a "@" variant is looked for as written (absolute, or relative to the
// working directory), then in the folder of the command's chain file
// (ResolveChainFile). All variants are rendered at the same oversampling
// factor. Labels must differ, ignoring case; the dry bypass clip (the take
// itself, no circuit) has a label of its own, "bypass" unless changed.
//
// Variants are rendered in parallel on the worker pool of package parallel,
// one per core (Options.Jobs), each streaming the take through the engine
// (engine.Prepared.Stream) into a float64 work file, so nothing clips
// before the gain is known. Build runs in steps: plan (options, take,
// variants, blind order, sequence), a workspace beside the folder, pass 1
// (render and measure), the loudness match, pass 2 (gain and write), the
// description with its sequence file and plots, the key, ab.json and the
// page, and the commit.
//
// Options out of range are *models.FieldError naming the option's field
// ("ceiling", "crossfade", "key", …); a set already in the folder is an
// *ExistsError (os.ErrExist), a take too short a *ShortTakeError.
//
// # Loudness matching
//
// Every clip's integrated loudness L and true peak P are measured per ITU-R
// BS.1770-4 (package loudness: K-weighting, gated 400 ms blocks, 4x
// oversampled true peak). A clip given gain g has loudness L + g and true
// peak P + g, so every clip can reach ceiling − (P − L) at most, and Match
// takes
//
//	common = min(target, min over clips of (ceiling − CeilingMargin − (P − L)))
//
// with the default target −18 LUFS and ceiling −1 dBTP. The gain is applied
// alone: no limiter, no clipping, no other processing. Each clip is measured
// again as written (after rounding to the output format); if a block crossed
// the −70 LUFS absolute gate and moved the result by more than 0.001 LU, the
// gain is corrected and the clip rewritten (at most three times).
//
// # Flags and warnings
//
// A variant whose match needs much more gain than the others is suspect: a
// dead build comes out quiet and the match raises it to the same loudness,
// so it sounds like just another variant. GainOverOthers compares each
// variant's gain with the median gain of the other variants (of the bypass,
// for a lone variant: a fuzz is normally louder than its dry take, so the
// bypass is otherwise left out); above QuieterLimitDB (12 dB) the clip is
// flagged "much quieter than the others: check it" in ab.json (flag,
// gain_over_others_db), in the set's warnings and beside its label on the
// page. Each variant also carries its chain's warnings (bias.Warnings: the
// build's, the stability check's with its rendered check, the operating
// point's), joined in the set's warnings with the variant's label where
// only some variants have them. A blind set keeps those chain warnings to
// its key (they name parts and settings) and shows flags by neutral label.
//
// # Sequence file
//
// sequence.wav holds K = rounds × len(order) segments. With S the segment, F
// the crossfade and P the start point, all rounded to whole frames of the
// take's rate, segment k plays its clip's frames P … P+S+F−1 at output frames
// k·S … k·S+S+F−1: its first F frames fade in with sin θ_j, its last F
// frames fade out with cos θ_j under the next segment's fade-in, θ_j =
// (π/2)(j + ½)/F. Output frame k·S + j is therefore exactly frame P + j of
// segment k's clip for F ≤ j < S, and sin θ_j·c_k[P+j] + cos θ_j·c_{k−1}[P+S+j]
// for j < F; the file has K·S + F frames. The take must hold P + S + F frames.
// If a crossfade would push the sequence's true peak over the ceiling, the
// whole file is turned down (gain only) to sit at the ceiling; the gain is
// recorded in ab.json. Sequence documents the fields.
//
// # Blind sets
//
// With Options.Blind the clips are shuffled by a Fisher–Yates permutation
// drawn from Options.Seed (Shuffle) and named A, B, C … (NeutralLabel), files
// clip-A.wav and so on. ab.json and the page then carry only neutral labels,
// files, loudness and peaks (ab.json keeps gain_db, a field of the project's
// interface, which hints at how loud a clip was before matching; the page
// needs none of ab.json, so a strict test can leave it out of what the
// listener gets). The key (Key) goes to a file outside the folder, by default
// DIR-key.json beside DIR; loading it into the page reveals the labels.
//
// # Listening page
//
// index.html is one file with its styles, script and data inline. It loads
// only the clips, the sequence file and any plots, by relative path: it works
// offline, from a folder on a disk or a stick. Each clip has a player; the
// buttons and keys 1–9 switch between them keeping the playback position and
// play state; a table gives settings, loudness, true peak, gain and loudness
// range. Plots are PNG files copied from Options.PlotDir (SLUG.TITLE.png, SLUG
// being Slug of the variant's label).
//
// # Pictures
//
// With Options.Pictures the set carries its own pictures, every variant in
// one figure each (PictureOptions): small-signal response, harmonics of a
// stated test sine, the same 40 ms of every clip from the middle of the
// take's loudest half second, and each clip's long-term third-octave
// spectrum; fig-*.png files listed in ab.json's "pictures". Clip i is drawn
// in style i of package plotting, and the page shows a swatch of that
// colour (plotting.Hex) beside its player; pictures are at least 700 px
// wide on the page. A blind set gets none. The page shows a hearing caution and
// starts its players at half volume. Its script's abPage.selfTest() (run on
// load when the page is opened with #selftest, the result written into the
// page) checks in the browser that every player loads and that switching
// keeps the position; the package's browser test drives it in a headless
// browser (the Debian package chromium) and skips itself when
// /usr/bin/chromium is absent.
//
// # Writing atomically
//
// Build declares every path it reads and writes in one outputs.Set (the
// take, the chain files, the output folder, the key) and checks it before
// any work: no output may be an input, by device and inode. It writes
// everything into the set's hidden work folder (beside a new output folder,
// inside an existing one) and commits only when every file is complete,
// the key with it, all or none: a new folder appears in one rename; into
// an existing folder (allowed with Options.Force when it holds earlier
// clips) the files are moved one by one, every file they replace kept
// until all are in place, and the earlier set's other files retired. On an
// error or interruption the work folder is deleted and the output folder
// and the key's path are as they were.
//
// # References
//
//   - ITU-R Recommendation BS.1770-4 (10/2015), Algorithms to measure audio
//     programme loudness and true-peak audio level.
//   - EBU Tech 3341 (2016), Loudness metering: "EBU Mode" metering to
//     supplement EBU R 128 loudness normalization (test cases used in tests).
//   - EBU Tech 3342 (2016), Loudness range.
//   - R. A. Fisher, F. Yates, Statistical Tables, 1938; D. E. Knuth, The Art
//     of Computer Programming vol. 2, §3.4.2 (the shuffle).
//   - Equal-power (sine/cosine) crossfades: common practice in audio editing.
//   - The browser's remote-debugging protocol over --remote-debugging-pipe
//     (browser test).
//
// # Non-goals
//
// No limiting, compression or equalisation of clips; no pictures of a
// blind set; no loudness matching of
// the sequence's segments beyond their clips'; no surround channel weights;
// no scoring or collection of a listener's answers (the key is for the
// builder); no streaming server — the page is opened from disk; no lossy
// audio formats.
package abtest
