// Package plotting draws the measurement bench's figures — frequency
// response families, spectra, harmonic bar charts, level and knob sweeps —
// as PNG or SVG files with gonum.org/v1/plot.
//
// A Figure is a column of Panels sharing one width. Each Panel has two
// Axes (linear or logarithmic, labelled with their quantity and unit),
// any number of Lines (one legend entry each) and, optionally, a bar chart
// of grouped categories (harmonic orders, say) drawn upward from a floor
// value, which suits levels in dB whose bars would otherwise hang from 0.
//
// Data are taken as they come: non-finite Y values (the −∞ dB of a line
// that is not there) split a line into pieces rather than failing, and
// points at or below zero on a logarithmic axis are left out. Logarithmic
// axes are labelled at 1, 2 and 5 times each power of ten with SI prefixes
// (20, 200, 2k, 20k), the way bench plots of audio circuits are read.
//
// Save writes the file under a temporary name in the same directory and
// renames it on success, so a failed or interrupted write leaves nothing
// at the destination.
//
// # References
//
//   - The gonum/plot library, gonum.org/v1/plot (plot, plotter, vg/draw,
//     vg/vgimg, vg/vgsvg).
//
// # Non-goals
//
// Interactive output, PDF or EPS files, colour themes, and plots of
// anything other than the bench's own quantities.
package plotting
