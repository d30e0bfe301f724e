// Package strap enumerates the strappings of an amplifier with matched
// resistors inside (catalog.MatchedNetwork): every way of tying its pins
// that makes a usable single-ended or differential amplifier, gain or
// attenuation, with the nominal figures of each and its error from the
// elements it uses.
//
// # Strapping
//
// Each external pin gets one terminal: the positive input vp, the negative
// input vn, the reference ref (the node the output is measured from; ground
// in a single-supply circuit), the output out (the internal op-amp's output
// pin is always out; a sense or feedback pin may be tied to it), a tie nK
// that joins it to the other pins marked nK and to nothing outside, or open.
// The text form lists the connected pins in the network's pin order, open
// pins left out: "IN-=vn IN+=vp FB=out REF=ref OUT=out". Connections is the
// structured form, one Terminal per pin.
//
// A strapping is kept when, with an ideal internal op-amp,
//
//   - the circuit has a unique DC solution (no floating node);
//   - the op-amp is in negative feedback: its offset's transfer to the
//     output, the noise gain NG = 1/β with β = ∂(V− − V+)/∂Vout, is
//     positive (a negative β is positive feedback, a latch; β = 0 leaves the
//     output undetermined). For the single-pole op-amp the loop 1 + Aβ is
//     stable exactly when β > 0 (Franco, "Design with Operational
//     Amplifiers and Analog Integrated Circuits", feedback chapter, from
//     memory);
//   - its transfer is finite and not zero: with both inputs connected the
//     nominal common-mode gain must be zero (a balanced difference
//     amplifier), otherwise the one input's gain is the strapping's gain.
//
// Strappings are equivalent when they leave the same elements carrying
// current between the same nets: an element whose one end reaches only an
// unconnected pin, an element with both ends on one net, and a group of
// elements reaching no input, reference, output or op-amp input carry no
// current and are dropped. Of equivalent strappings the one with the fewest
// connected pins stands for all (the first the walk meets among equals).
// Enumerate then folds strappings whose figures all agree (equal elements
// swapped, an input through an element that carries no current) into the
// one with the fewest connections, listing the others in Equivalents. It
// also lists each circuit once where naming is arbitrary: a single-ended
// strapping takes its input at vp (its twin at vn is the same circuit),
// and a differential one has a positive gain (swapping vp and vn negates
// it).
//
// # Transfer
//
// With an ideal op-amp the output is linear in the three sources:
//
//	Vout = Gp·Vp + Gn·Vn + Gr·Vref,   Gp + Gn + Gr = 1
//
// (the sum is 1 because moving every source by the same voltage moves every
// node by it: the network holds no ground of its own). A differential
// strapping has the differential gain Adm = (Gp − Gn)/2 and the common-mode
// gain Acm = Gp + Gn, zero in the nominal network, so that Vout = Adm·(Vp −
// Vn) + Vref; the classic difference amplifier R1..R4 gives Adm = R2/R1 when
// R4/R3 = R2/R1 (domain notes §2). A single-ended strapping has gain Gp
// (input vp) or Gn (input vn), and Vout − Vref = G·(Vin − Vref).
//
// # Ratio tolerance (the model)
//
// Element i of the network is Ri = s·Ri0·(1 + εi): s is a scale common to
// the whole network (its absolute tolerance, RatioTolerance aside, and its
// common temperature coefficient) and |εi| ≤ δ/2 with δ = RatioTolerance,
// so the ratio of any two elements is within about ±δ of nominal, which is
// how a maker's ratio tolerance (matching) of a network is read (common
// practice). The gain depends on ratios only (it is homogeneous of degree
// zero in the resistances), so s drops out, and to first order
//
//	ΔG/G = Σ Si·εi,   Si = ∂ln|G|/∂ln Ri,   Σ Si = 0
//
// (the sum is Euler's theorem for a function homogeneous of degree zero).
// The worst-case gain error is Σ|Si|·δ/2 and the root-sum-square one
// sqrt(Σ Si²)·δ/2, at the coverage the tolerance has (3 σ when δ is a
// 3-σ figure, domain notes §4). Tracking is read the same way: every
// element's temperature coefficient is within ±τ/2 of a common one, with τ
// = RatioDriftPPM, so the gain drifts at most Σ|Si|·τ/2 ppm/K. The
// worst-case common-mode gain is |Acm| + Σ|∂Acm/∂ln Ri|·δ/2 and the
// worst-case CMRR Adm over it; for the four-resistor difference amplifier
// of gain G this is (1+G)/(2δ), the textbook (1+G)/(4t) with t = δ/2 the
// tolerance of each element about the common scale (Franco, difference
// amplifier section, from memory; domain notes §2 and §6). The figures are
// first order in δ: the next term is of order δ², under 1e-6 of the gain
// at δ = 0.1 %. An unknown RatioTolerance or RatioDriftPPM (NaN) gives
// unknown (NaN) figures, never zero.
//
// The sensitivities are exact (not finite differences): changing Ri by
// εi·Ri is, to first order, a current source Ii·εi across it (the
// compensation theorem), so ∂Vout/∂εi = −Ii·Ti where Ii is the element's
// current from A to B and Ti the transfer to the output of a current
// injected from A to B, read from one adjoint solve of package circuit.
//
// # Impedances and ranges
//
// The input impedance of each input (and of the reference pin) is the
// source's voltage over the current it delivers with the other sources at
// zero (the usual datasheet convention, common practice); it scales with
// the absolute tolerance. The op-amp's offset is multiplied by NG, and its
// bias currents see the Thevenin resistances SourcePlusOhm and
// SourceMinusOhm at its inputs (the transfers of the bias currents divided
// by NG). With the ideal op-amp's virtual short both inputs sit at
// Kp·Vp + Kn·Vn + Kr·Vref; InputRange solves that against the op-amp's
// input common-mode range, which an internal divider (|Kp + Kn| < 1) lets
// reach beyond the rails (domain notes §9).
//
// Every circuit is solved through package circuit; nothing here solves a
// network of its own.
//
// # Use by a circuit family
//
// The family of strapped amplifiers (package family, the family whose
// Search.Strappings is set) uses the package so:
//
//   - Search: for each catalog amplifier with a Network, call Enumerate once
//     (about 0.2 s for eight pins, BenchmarkEnumerate) and keep the
//     strappings whose Kind suits the spec's input (Differential for a
//     differential input; FromPlus for a single-ended one) and whose Gain
//     is within the gain window; each is one design of that part, priced
//     as the part. The screening bounds read GainErrorWorst or
//     GainErrorRSS (by the spec's method), GainDriftPPM, CMRRWorst
//     (combined with the internal op-amp's own CMRR, 1/CMRR ≤ 1/CMRRr +
//     1/CMRRa, domain notes §2), NoiseGain for the offset and noise,
//     SourcePlusOhm and SourceMinusOhm for the bias currents,
//     InputPlusOhm/InputMinusOhm against an input-impedance limit, and
//     InputRange with the amplifier's rails and common-mode range (the
//     hard limit that lets inputs beyond the rails through).
//   - Budget: Netlist gives the strapped circuit with its sources named as
//     the family netlists name them ("vp"/"vn" or "vin", "vref", output
//     "out"), so the exact budget solves it like any other netlist: each
//     element a position with the network's figures (RatioTolerance and
//     RatioDriftPPM as a network's ratio tolerance and tracking, Tolerance
//     absolute), the source and load resistances added at vp, vn or vin
//     and out, and the internal op-amp's figures from catalog.Amplifier.
//   - What changes from the matched family: that family prices a part at
//     a front-page gain G and takes the noise gain as 1 + G and the op-amp
//     inputs at G/(1+G) of the input common mode, true only of the
//     strapping as drawn. A strapped family takes NoiseGain and
//     OpAmpInputV (or InputRange) of the strapping instead: strapping the
//     same part for another gain changes both, and an attenuating
//     strapping can have a noise gain of 1 or 3 at the same gain.
//   - The catalog must carry the network (catalog.Amplifier.Network) from
//     the store and the importers to the search; a part without one keeps
//     its front-page gains.
//   - Part turns a strapping into the family.PartCircuit the family's
//     netlist is built from (family.Options.Part), so that the budget, the
//     SPICE decks and the reports take a strapped design like any other.
//     The differential family takes Differential strappings; the
//     single-ended one (walked as a circuit of its own, since its
//     strappings make either sign) takes FromPlus strappings with the
//     reference terminal at ground, matching the sign of the spec's gain.
//   - Spec and results: a design names its strapping by Text (JSON: the
//     amplifier part carries "strapping"); Parse and Evaluate turn it back
//     into the same Strapping, with errors that name the pin and say what
//     to write.
package strap
