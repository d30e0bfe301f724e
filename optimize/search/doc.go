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
// Families: the difference amplifier from four discrete resistors, on a
// matched four-element network, or as an amplifier with matched resistors
// inside; the non-inverting and inverting amplifiers; the unbuffered
// divider; current sense (a shunt from the catalog, then a difference
// search per shunt with the limits less the shunt's share, merged by
// cost); the three-op-amp instrumentation amplifier (Rg, Rf1 = Rf2 of one
// value and grade, a second-stage difference amplifier R1 = R3, R2 = R4 of
// four discrete resistors of one value at unity gain or on a matched
// network, one op-amp part at A1..A3 counted in packages by its channels;
// G = (1 + 2Rf/Rg)·R2/R1, one exact sub-search per second-stage gain,
// merged by cost); the level shift Vout = m·Vin + b with the reference
// summed into the non-inverting node through R1, R2, R3 and Rg = Rf (NG =
// 2 exactly, so only the input network's two ratios R2/R1 and R3/R1 are
// quantized; exact corners of slope and offset with the reference's
// tolerance and drift); a negative offset takes the reference into the
// inverting input through R2 (Vout = Vin·R3/(R1+R3)·(2 + Rf/R2) -
// Vref·Rf/R2 with Rg = Rf; R2 of the feedback grade, R3/R1 aimed at the
// noise gain of the R2 value). A zero offset, m + b/Vref >= 2 (positive
// offset) and m >= 2 - b/Vref (negative offset) are refused with a message.
//
// Screening model (approximations from the domain notes and S. Franco,
// "Design with Operational Amplifiers and Analog Integrated Circuits",
// difference-amplifier chapter; exact corners where they are cheap):
//
//	ratio k = Rf/Rg, each resistor within ±t: k in k0·[(1-tf)/(1+tg), (1+tf)/(1-tg)],
//	  widened by load-life shifts over life and by the tempcos over the
//	  worst excursion ΔT = max(|Tmax-Tref|, |Tmin-Tref|)
//	difference amplifier: Acm = (k2-k1)/(1+k2), Adm = (k2(1+k1)/(1+k2)+k1)/2,
//	  CMRR = Adm/|Acm| ≈ (1+G)/(4t) for four resistors of tolerance t,
//	  (1+G)/(2r) on a network with ratio tolerance r;
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
