// Package eseries holds the IEC 60063:2015 preferred number series E3, E6,
// E12, E24, E48, E96 and E192, as used for resistor values.
//
// Each series has N values per decade. E3 to E24 are given to two
// significant figures and E48 to E192 to three. The higher series follow
// 10^(i/N) rounded to three significant figures (with the single exception
// of 9.20 in E192); the lower series are held as the standard's table, which
// departs from the rounded formula at 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and
// 8.2 in E24. Tables are therefore literal data, never computed.
//
// Values are produced as exact decimals: 4990 is the float64 nearest to
// 4990, never 4989.999999.
package eseries
