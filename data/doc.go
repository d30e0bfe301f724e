// Package data holds what plumb embeds: the demonstration catalog (an
// invented snapshot of resistor series, shunts, matched networks and
// amplifiers, with price breaks and stock) and the example spec files.
//
// Every maker, part number, figure and price in it is invented for
// demonstration; none describes a real product.
package data
