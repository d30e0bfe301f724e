// Package cost prices a design for a build: how many pieces of each part
// number are bought, at which price break, with the minimum order quantity,
// attrition, optional assembly costs per placement and per distinct line
// item, and the stock on hand.
//
// The arithmetic is common practice for a bill of materials: for each part
// number, the pieces needed are the placements per stage times the number of
// stages built; the pieces bought are that count times (1 + attrition),
// rounded up, then raised to the minimum order quantity; the unit price is the
// price of the largest break at or below the quantity bought. Buying up to a
// higher break is chosen when it makes the line cheaper (a fact of the trade:
// 100 pieces at 0.02 can cost less than 80 at 0.05).
//
// Price works on part numbers and placement counts, and is what the search
// calls. DesignBOM is the one walk of a design into a purchasing list,
// shared by the command line and the report: positions per part number,
// pieces per stage (a network is one piece for its elements, an amplifier
// as many packages as its channels need for the family's op-amps), the
// break used and the stock, with the positions left unpriced because they
// are given as inline figures. BuildOf maps a spec's build section onto a
// Build.
package cost
