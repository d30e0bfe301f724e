// Package budget computes the error budget of a concrete signal-conditioning
// design against its spec: gain error, CMRR, gain drift, output offset,
// bandwidth, noise, amplifier headroom and resistor ratings, each with its
// contributors sorted by size, under worst case (every tolerance corner),
// root-sum-square or Monte Carlo analysis.
//
// Every figure comes from an exact solve of the stage's netlist
// (optimize/circuit): gain is the solved transfer from the signal source,
// common-mode gain the solved transfer from a common-mode source, offset the
// superposition of the solved transfers from each op-amp's offset voltage
// and bias-current sources. The small-error formulas of the trade (CMRR =
// (1+G)/(4t) for a difference amplifier, gain error NG/A) are used only by
// Screen for fast bounds and in tests as outside checks.
//
// Resistor model: R = Rnom (1 + δ)(1 + α (T - Tref)) with δ within the
// tolerance and α within the TCR box. A network element is R = Rnom (1 + δc +
// δi)(1 + (αc + αi)(T - Tref)), where δc and αc are drawn once per network
// and δi, αi within half the ratio tolerance and half the tracking tempco, so
// any two elements' ratio stays within the ratio tolerance and their tempcos
// within the tracking figure (domain notes §2-§4).
//
// Calibration: with gain calibration the gain is trimmed once at the
// reference temperature, so the gain error left is G(T)/G(Tref) - 1 of the
// same parts; with offset calibration the offset left is V(T) - V(Tref).
// Drift, CMRR, noise and load-life terms remain.
package budget
