// Package search finds the lowest-cost designs in a catalog that meet every
// limit of a spec, ranks them, explains the ranking and lists near misses.
//
// The search space is a set of design classes (a circuit family, a resistor
// grade group or a network per position, and an amplifier); within a class
// only resistor values vary. A grade group is every value the catalog sells
// in one grade (technology, size, tolerance, tempco, ratings, thermal
// resistance, load life); catalogs price part by part, so for each value
// and each number of placements per stage the group keeps the cheapest part
// at the build quantity (price breaks, minimum order, stock rule), and
// prices never multiply the classes. A catalog file is read through one
// indexed query of the spec's value window, streamed and reduced to those
// groups (SolveCatalog), so time and memory follow the candidate rows. Hard limits (supply span, pin headroom, output
// swing, bandwidth, resistor ratings) remove candidates before any error
// budget is computed. Solve walks the classes in order of a cost lower bound
// (the cheapest completion of the class) and skips a class when a lower
// bound on its errors, from the grades' tolerance and tempco alone, already
// breaks a limit; it stops when the next lower bound exceeds the N-th best
// cost found. Exhaustive walks every class and every value and is kept as the
// oracle: both return the same designs.
//
// Families come from package family's registry; the search never names
// one. A family's Search field says how its space is walked (family.
// Strategy): a ratio pair (Rg and Rf values of one grade each, or a matched
// network, the gain set by k = Rf/Rg through the family's Ratio model); two
// stages (the in-amp: Rg, Rf1 = Rf2 and one exact sub-search per
// second-stage gain R2/R1 on four discrete resistors at unity or a matched
// network, one op-amp part at A1..A3 counted in packages, merged by cost); a
// shift network (the level shift: the reference summed into the
// non-inverting node through R1, R2, R3 with Rg = Rf, or into the inverting
// input through R2 for a negative offset; see levelshift.go); a shunt (a
// shunt from the catalog, then the family Search.As per shunt with the
// limits less the shunt's share, merged by cost); or one catalog part walked
// in another family's circuit (an amplifier with matched resistors inside).
// Each family's file in package family holds its equations.
//
// Screening model (approximations from the domain notes and S. Franco,
// "Design with Operational Amplifiers and Analog Integrated Circuits",
// difference-amplifier chapter; exact corners where they are cheap):
//
//	ratio k = Rf/Rg, each resistor within ±t: k in k0·[(1-tf)/(1+tg), (1+tf)/(1-tg)],
//	  widened by load-life shifts over life and by the tempcos over the
//	  worst excursion ΔT = max(|Tmax-Tref|, |Tmin-Tref|)
//	four-resistor stages (family.Ratio.FourResistor): the CMRR of the two
//	  ratios' mismatch (see family.Difference), and
//	  1/CMRR_total = 1/CMRR_resistors + 1/CMRR_amplifier (worst case)
//	finite open-loop gain: G/(1+NG/A)
//	drift: ratio drift ((1+cf·ΔT)/(1-cg·ΔT) - 1)/ΔT ≈ TCRf + TCRg, or the
//	  network's tracking, times the gain's sensitivity to the ratio
//	output offset: NG·(Vos + Ios·Rf∥Rg + Ib·Rf∥Rg·2t) + NG·dVos/dT·ΔT
//	noise: NG·sqrt(en² + n·(4kT·Rf∥Rg + (in·Rf∥Rg)²)), RMS over π/2·GBW/NG
//
// With Options.Combos (or the spec's combos list), a feedback position
// may take two values of its grade in series or in parallel where the pair
// is nearer the target ratio than any single value (see Options.Combos).
//
// Under root-sum-square, independent tolerances add in quadrature (a
// tolerance is 3 sigma) and systematic terms (ratio quantization, NG/A) add
// linearly. Monte Carlo specs are screened with the RSS figures.
//
// Solve then confirms every design it keeps with the exact budget of
// package budget (a nodal solve of every corner under the spec's method);
// a design the budget fails becomes a near miss and the next class takes
// its rank, so the budget has the last word. The near misses found on the
// screening figures are confirmed the same way (at most 12 budget runs per
// search): a listed near miss carries the budget's figures and failures, a
// candidate the budget passes is counted in a note instead of listed (the
// screening was pessimistic for it), and a fix the budget still fails is
// said so in the reasons.
package search
