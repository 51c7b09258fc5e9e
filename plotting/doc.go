// Package plotting draws the bench's figures — frequency responses, scope
// views, spectra, harmonic bar charts, waveforms, third-octave spectra,
// spectrograms, level and knob sweeps — as PNG or SVG files with
// gonum.org/v1/plot, all in one look.
//
// # Figures
//
// A Figure is one column of Panels (or two, with Beside) under an
// optional title and key. Each Panel has two Axes (linear or logarithmic,
// labelled with quantity and unit), any number of Lines, optionally a bar
// chart of grouped categories drawn upward from a floor value (levels in
// dB would otherwise hang from 0), horizontal Marks (supply rails) and a
// Heat map with its colour bar. Data are taken as they come: non-finite
// Y values split a line into pieces, points at or below zero on a
// logarithmic axis are left out, and lines are clipped to their axes.
//
// Builders turn plain data into finished figures: ResponseFigure (gain,
// unwrapped phase, group delay), ScopeFigure (a few cycles at the input
// and a probed node against time, rails, and the transfer curve),
// HarmonicsFigure, WaveformFigure and ThirdOctaveFigure (every variant of
// a listening set in one picture), and SpectrogramFigure (one file, or
// dry against wet, on one colour scale).
//
// # One look
//
// Style i (a variant's position on the listening page) has colour i of
// the Okabe–Ito palette (less its yellow), dash pattern i, glyph i and
// bar hatching i, so curves stay apart for the common colour-vision
// deficiencies and in grey print; Hex gives the colours as CSS strings
// for the page's players. The palette's pairwise CIE 1976 colour
// differences stay above 15 under the dichromat simulation of Machado et
// al. (tested). Heat maps use Green's cubehelix scheme, whose grey level
// rises steadily with the value. Type is one sans-serif face: 12 pt
// figure titles, 11 pt panel titles, 10 pt axis labels, 9 pt ticks and
// legends (15 pixels at the default 18 cm and 120 pixels per inch).
//
// Linear axes are ticked at round steps (1, 2, 5 × 10^k; 10 or 20 dB on
// decibel axes; 45°, 90° or 180° on phase axes) labelled with only the
// decimals the step needs and, where the axis has a Unit, one engineering
// prefix for the whole axis ("time (ms)"). Logarithmic axes are labelled
// at 1, 2 and 5 times each power of ten with SI prefixes (20, 200, 2k,
// 20k), with minor ticks between.
//
// # Files
//
// PNG files use a 256-colour palette (quantize), which keeps figures at
// tens of kilobytes; SVG text names the face with a sans-serif fallback
// (fonts are not embedded). Save writes the file under a temporary name
// in the same directory and renames it on success, so a failed or
// interrupted write leaves nothing at the destination.
//
// Inspect draws a figure as PNG and reports what a picture check needs:
// the file and its decoded image, the size asked for, the data areas, and
// where the pixels of curve colours fell; Inspection.Problems and
// SVGProblems turn that into findings. Packages that draw figures test
// theirs with them.
//
// # References
//
//   - The gonum/plot library, gonum.org/v1/plot (plot, plotter, vg/draw,
//     vg/vgimg, vg/vgsvg).
//   - M. Okabe and K. Ito, "Color Universal Design (CUD): how to make
//     figures and presentations that are friendly to colorblind people",
//     2002/2008; sRGB values as published by B. Wong, "Points of view:
//     Color blindness", Nature Methods 8, 2011, p. 441.
//   - G. M. Machado, M. M. Oliveira, L. A. F. Fernandes, "A
//     physiologically-based model for simulation of color vision
//     deficiency", IEEE Trans. Vis. Comput. Graphics 15(6), 2009.
//   - D. A. Green, "A colour scheme for the display of astronomical
//     intensity images", Bull. Astr. Soc. India 39, 2011, pp. 289–295.
//   - IEC 61966-2-1:1999 (sRGB); CIE 15:2004 (CIE 1976 L*a*b*); W3C
//     WCAG 2.1 (relative luminance, contrast ratio, success criterion
//     1.4.11).
//
// # Non-goals
//
// Interactive output, PDF or EPS files, user-chosen colour themes, and
// plots of anything other than the bench's own quantities. The builders
// draw what they are given; measuring is left to the packages that
// produce the data (measure, dsp/spectrum, abtest).
package plotting
