// Package budget computes the error budget of a concrete signal-conditioning
// design against its spec: gain error, CMRR, gain drift, output offset and
// its drift, bandwidth, noise, amplifier headroom and resistor ratings,
// each with its contributors sorted by size, under worst case (every
// tolerance corner), root-sum-square or Monte Carlo analysis, plus the
// cautions a hazardous or near-rating design needs.
//
// Every figure comes from an exact solve of the stage's netlist
// (optimize/circuit): gain is the solved transfer from the signal source,
// common-mode gain the solved transfer from a common-mode source, offset the
// solved output with the reference applied plus each op-amp's offset
// voltage and bias currents through their solved transfers. The
// small-error formulas of the trade (CMRR = (1+G)/(4t), gain error NG/A)
// appear only in the tests, as outside checks. Noise: each resistor's
// thermal current sqrt(4kT/R) and the amplifier's noise sources are carried
// to the output by solved transfers.
//
// Resistor model: R = Rnom (1 + δ + λ)(1 + α (T - Tref + P θ)) with δ within
// the tolerance, λ within the load-life figure, α within the TCR box and
// P θ the self-heating rise. A network element has δ = δc + δi and α = αc +
// αi, where δc and αc are one shift for the whole network and δi, αi lie
// within half the ratio tolerance and half the tracking tempco, so any two
// elements' ratio stays within the ratio tolerance and their tempcos within
// the tracking figure (domain notes §2-§4). Each of these is a parameter x
// in [-1, 1]; worst case visits the corners x = ±1, RSS takes a tolerance as
// spec.Analysis.Sigmas standard deviations, Monte Carlo draws x uniform or
// normal truncated at ±1.
//
// Temperature points: the reference temperature as built (the calibration
// point), the reference temperature after load life when any part has a
// load-life figure, and the two ends of the range. Drift is measured from
// the reference point after load life, so load life counts in the gain
// error and not in the drift.
//
// Calibration: with gain calibration the gain is trimmed once at the
// reference temperature, so the gain error left is G(T)/G(Tref) - 1 of the
// same parts; with offset calibration the offset left is V(T) - V(Tref).
// Drift, CMRR, noise and load-life terms remain.
//
// Amplifier terms (Vos and its drift, bias and offset currents, CMRR) are
// linear in the output; worst case adds them at their worst sign, RSS in
// quadrature, Monte Carlo draws them. Their transfers to the output come
// from the same adjoint solve as the gain at every point and temperature;
// only each op-amp's pin common mode (its share of CMRR) and noise gain are
// solved once per candidate at nominal values.
//
// Evaluate builds a full Result for reports. The search uses an Evaluator:
// Score is allocation-free and, under worst case, evaluates the corners the
// solved sensitivities point to instead of all 2^n (see worstGuided), then
// climbs from the drift's guided corners one flip at a time to a corner no
// single flip improves (see climbDrift), which catches the tolerance x
// tempco cross terms the sensitivities miss; a property test holds gain
// error, CMRR and drift equal to the full enumeration on random designs.
package budget
