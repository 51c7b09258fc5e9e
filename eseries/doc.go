// Package eseries holds the preferred-number series of IEC 60063 for
// resistors and capacitors (E3, E6, E12, E24) and finds the series values
// nearest to, or bracketing, a given value.
//
// # The tables
//
// The values are the tabulated ones of IEC 60063 ("Preferred number series
// for resistors and capacitors"), not 10^(k/n) rounded to two figures: the
// standard keeps the older values 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2
// in E24 where rounding would give 2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6 and
// 8.3 (and E12 and E6 take their values from E24). Each series comes with the
// tolerance the standard associates with it: E6 ±20 %, E12 ±10 %, E24 ±5 %
// (E3 is listed for tolerances wider than ±20 %).
//
// Values are held as whole numbers of tenths (10, 11, 12, … 91), so a series
// value in any decade is built by one correctly rounded multiplication or
// division by a power of ten: Nearest(4650) is exactly 4700 and
// Nearest(4.6e-9) the float64 nearest to 4.7e-9.
//
// # Nearest value
//
// "Nearest" is measured on a logarithmic scale (the ratio v/e closest to 1),
// which is how the series are spaced: 5.1 kΩ is nearer 4.7 kΩ than 5.6 kΩ
// because 5.1/4.7 < 5.6/5.1.
//
// # References
//
//   - IEC 60063:2015, Preferred number series for resistors and capacitors,
//     table 1 (E3 … E24).
//
// # Non-goals
//
// The three-figure series E48, E96 and E192 are not tabulated here, and the
// package says nothing about which series a manufacturer stocks in which
// tolerance: Series.Tolerance is the standard's association only.
package eseries
