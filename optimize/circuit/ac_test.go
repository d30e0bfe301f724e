package circuit

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
)

// randomGBW returns a gain-bandwidth for every op-amp of n, log-uniform in
// 100 kHz..10 MHz; with frozen, op-amp frozen (if any) is frequency-
// independent, alternately as 0 and as +Inf.
func randomGBW(n *Netlist, r *rand.Rand, frozen int) []float64 {
	g := make([]float64, len(n.OpAmps))
	for k := range g {
		g[k] = 1e5 * math.Pow(100, r.Float64())
	}
	if frozen >= 0 && frozen < len(g) {
		g[frozen] = 0
		if r.IntN(2) == 0 {
			g[frozen] = math.Inf(1)
		}
	}
	return g
}

// At f = 0 every op-amp is at its DC gain, so the AC solve is Solve's
// (itself checked against gonum's full MNA and ngspice): on seeded random
// circuits of every family and option combination, with every excitation
// on and assorted gain-bandwidths, ACGain(0) equals SolveOut to rounding
// and has no imaginary part.
func TestACGainAtDC(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 3))
	for _, f := range Families() {
		for c := range 4 * len(variants(f)) {
			n := randomCase(f, c, r)
			gbw := randomGBW(n, r, c%3-1)
			s := NewSolver(n)
			if err := s.Factor(); err != nil {
				t.Fatal(err)
			}
			v := make([]float64, len(n.Nodes))
			s.Solve(v)
			vmax := 0.0
			for _, x := range v {
				vmax = max(vmax, math.Abs(x))
			}
			h, err := s.ACGain(0, gbw)
			if err != nil {
				t.Fatalf("%s case %d: %v", f, c, err)
			}
			if e := relErr(real(h), v[n.Out], vmax); e > 1e-13 || imag(h) != 0 {
				t.Errorf("%s case %d%s: ACGain(0) = %.17g%+.3gi, Solve %.17g (rel %.2g)", f, c, gainsOf(n), real(h), imag(h), v[n.Out], e)
			}
		}
	}
}

// singleLoop gives the noise gain 1/β of a one-op-amp family from its
// resistor values, with the input sources as AC ground (S. Franco, "Design
// with Operational Amplifiers and Analog Integrated Circuits", ch. 1 and 6,
// from memory).
var singleLoop = []struct {
	name string
	f    Family
	o    Options
	ng   func(r func(string) float64) float64
}{
	{"inverting", Inverting, Options{}, func(r func(string) float64) float64 { return 1 + r("Rf")/r("Rg") }},
	{"inverting with source impedance and load", Inverting, Options{SourceImpedance: true, Load: true},
		func(r func(string) float64) float64 { return 1 + r("Rf")/(r("Rg")+r("Rsrc")) }},
	{"non-inverting", NonInverting, Options{SourceImpedance: true}, func(r func(string) float64) float64 { return 1 + r("Rf")/r("Rg") }},
	{"difference", Difference, Options{SourceImpedance: true, RefDivider: true},
		func(r func(string) float64) float64 { return 1 + r("R2")/(r("R1")+r("Rsrcn")) }},
	{"current sense", CurrentSense, Options{Load: true}, func(r func(string) float64) float64 { return 1 + r("R2")/r("R1") }},
	{"buffered divider", Divider, Options{Buffer: true}, func(func(string) float64) float64 { return 1 }},
	{"level shift", LevelShift, Options{}, func(r func(string) float64) float64 { return 1 + r("Rf")/r("Rg") }},
	{"level shift, offset to the inverting side", LevelShift, Options{OffsetToInverting: true},
		func(r func(string) float64) float64 { return 1 + r("Rf")*(r("Rg")+r("R2"))/(r("Rg")*r("R2")) }},
}

// A single-pole op-amp, 1/A = 1/Aol + j f/GBW, in a resistive loop of
// noise gain NG gives every excitation the closed-loop response
// H(f) = H∞/(1 + NG/A) = H(0)(1 + NG/Aol)/(1 + NG/Aol + j f NG/GBW), whose
// -3 dB point is f3 = GBW (1/NG + 1/Aol) (Franco ch. 6, from memory; the
// asymptotic-gain form, H∞ T/(1+T) with no direct feed-through because the
// output is the op-amp's). Seeded random values, every excitation on.
func TestSinglePoleStages(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 9))
	for _, tc := range singleLoop {
		t.Run(tc.name, func(t *testing.T) {
			for c := range 40 {
				n := mustNew(tc.f, tc.o)
				randomize(n, r)
				if c == 0 {
					// Noise gain 1e8 with an ideal DC gain: f3 = GBW/1e8 is
					// below where the scan starts and is found stepping down.
					n.OpAmps[0].Gain = math.Inf(1)
					if k := n.Resistor("Rf"); k >= 0 {
						n.Resistors[k].Ohm = 1e8 * n.Resistors[n.Resistor("Rg")].Ohm
					}
				}
				ohm := func(name string) float64 { return n.Resistors[n.Resistor(name)].Ohm }
				ng, aol := tc.ng(ohm), n.OpAmps[0].Gain
				gbw := []float64{1e4 * math.Pow(1e4, r.Float64())}
				s := NewSolver(n)
				h0, err := s.ACGain(0, gbw)
				if err != nil {
					t.Fatal(err)
				}
				den0 := 1 + ng/aol
				want3 := gbw[0] * (1/ng + 1/aol)
				for _, x := range []float64{1e-3, 0.5, 1, 2, 1e3} {
					f := x * want3
					h, err := s.ACGain(f, gbw)
					if err != nil {
						t.Fatal(err)
					}
					want := h0 * complex(den0, 0) / complex(den0, f*ng/gbw[0])
					if e := cmplx.Abs(h-want) / cmplx.Abs(want); e > 1e-11 {
						t.Errorf("case %d NG %.6g Aol %g: H(%.6g Hz) = %.12g, want %.12g (rel %.2g)", c, ng, aol, f, h, want, e)
					}
				}
				bw, err := s.Bandwidth(gbw)
				if err != nil {
					t.Fatal(err)
				}
				if e := relErr(bw, want3, 0); e > 1e-9 {
					t.Errorf("case %d NG %.6g Aol %g GBW %.6g: bandwidth %.12g Hz, want GBW(1/NG + 1/Aol) = %.12g (rel %.2g)", c, ng, aol, gbw[0], bw, want3, e)
				}
			}
		})
	}
}

// loadCellInAmp is the in-amp of a load-cell front end: bridge arms of
// 350 ohm as source impedances, Rf1 = Rf2 = 100k and Rg = 1k (first-stage
// gain 201), a unity difference stage of 10k resistors, op-amps of Aol 2e6
// and GBW 600 kHz, driven differentially with ±0.5 V.
func loadCellInAmp() (*Netlist, []float64) {
	n := mustNew(InAmp, Options{SourceImpedance: true})
	for i := range n.Resistors {
		switch n.Resistors[i].Name {
		case "Rsrcp", "Rsrcn":
			n.Resistors[i].Ohm = 350
		case "Rf1", "Rf2":
			n.Resistors[i].Ohm = 100e3
		case "Rg":
			n.Resistors[i].Ohm = 1e3
		default:
			n.Resistors[i].Ohm = 10e3
		}
	}
	setGain(n, 2e6)
	n.Sources[n.SourceIndex("vp")].V = 0.5
	n.Sources[n.SourceIndex("vn")].V = -0.5
	return n, []float64{600e3, 600e3, 600e3}
}

// The load-cell in-amp driven differentially: by symmetry the first stage's
// outputs move in antiphase about the grounded midpoint of Rg, so each input
// amplifier's loop has noise gain NGd = 1 + Rf/(Rg/2) = 201, not the
// 1 + Rf/Rg = 101 of its loop alone, and the unity difference stage has
// noise gain 2. The response is the cascade of the two single-pole loops
// (Franco ch. 6 and the in-amp chapter, from memory):
//
//	H = 201 / ((1 + 201/A)(1 + 2/A)),   1/A = 1/Aol + j f/GBW,
//
// whose -3 dB point solves (a1² + b1² f²)(a2² + b2² f²) = 2 a1² a2², a
// quadratic in f², near GBW/201 = 2985 Hz: 2985.11 Hz. ngspice's AC
// analysis of the same circuit measures 2985.106 Hz when its meas target
// is its own |H(0)|/√2 = 142.1133 V on a fine sweep (a target of 142.11 V,
// 2.4e-5 low, moves the crossing up by 0.14 Hz, to 2985.25 Hz).
func TestLoadCellInAmpBandwidth(t *testing.T) {
	n, gbw := loadCellInAmp()
	s := NewSolver(n)
	bw, err := s.Bandwidth(gbw)
	if err != nil {
		t.Fatal(err)
	}
	aol, g := 2e6, 600e3
	a1, b1 := 1+201/aol, 201/g
	a2, b2 := 1+2/aol, 2/g
	qa, qb, qc := b1*b1*b2*b2, a1*a1*b2*b2+a2*a2*b1*b1, -a1*a1*a2*a2
	want := math.Sqrt((-qb + math.Sqrt(qb*qb-4*qa*qc)) / (2 * qa))
	if e := relErr(bw, want, 0); e > 1e-9 {
		t.Errorf("bandwidth %.10g Hz, want %.10g (rel %.2g)", bw, want, e)
	}
	if math.Abs(bw-g/201) > 1 {
		t.Errorf("bandwidth %.6g Hz, want about GBW/201 = %.6g Hz", bw, g/201)
	}
	for _, f := range []float64{0, 100, 2985, 30e3, 1e6} {
		h, err := s.ACGain(f, gbw)
		if err != nil {
			t.Fatal(err)
		}
		inv := complex(1/aol, f/g)
		want := 201 / ((1 + 201*inv) * (1 + 2*inv))
		if e := cmplx.Abs(h-want) / cmplx.Abs(want); e > 1e-12 {
			t.Errorf("H(%g Hz) = %.12g, want %.12g (rel %.2g)", f, h, want, e)
		}
	}
}

// composite is a two-op-amp composite amplifier: A1, non-inverting input
// vin, drives A2, a non-inverting stage of gain g2 = 1 + Rf2/Rg2 (Rg2 open
// for g2 = 1), and the overall feedback Rf/Rg from A2's output to A1's
// inverting input sets the noise gain ng = 1 + Rf/Rg. Both op-amps are in
// one loop, so the response is second order and can peak.
func composite(ng, g2 float64) *Netlist {
	rf2, rg2 := (g2-1)*1e3, 1e3
	if g2 == 1 {
		rf2, rg2 = 1e3, math.Inf(1)
	}
	return &Netlist{
		Family:    "composite",
		Nodes:     []string{"0", "vin", "m", "o1", "m2", "out"},
		Sources:   []Source{{Name: "vin", Node: 1, V: 1}},
		Resistors: []Resistor{{"Rf", 5, 2, (ng - 1) * 1e3}, {"Rg", 2, 0, 1e3}, {"Rf2", 5, 4, rf2}, {"Rg2", 4, 0, rg2}},
		OpAmps: []OpAmp{{Name: "A1", Plus: 1, Minus: 2, Out: 3, Gain: math.Inf(1)},
			{Name: "A2", Plus: 3, Minus: 4, Out: 5, Gain: math.Inf(1)}},
		Out: 5,
	}
}

// The composite amplifier with integrating op-amps (Aol = +Inf) has
// H = NG/(1 + NG/(A1 A2cl)), A2cl = G2/(1 + j f G2/GBW2), that is the
// second-order low-pass NG/(1 - x² + j x/Q) with x = f/f0,
// f0² = GBW1 GBW2/NG and Q = G2 √(GBW1/(NG GBW2)); it peaks for Q > 1/√2,
// at x² = 1 - 1/(2Q²), and is 3 dB down where y = x² solves
// (1-y)² + y/Q² = 2 (Franco ch. 3 on second-order responses, from memory).
func TestBandwidthPeaking(t *testing.T) {
	tests := []struct {
		name              string
		ng, g2, gbw1, g2w float64
		peaks             bool
	}{
		{"overdamped, Q = 0.32", 10, 1, 1e6, 1e6, false},
		{"maximally flat, Q = 1/√2", 2, 1, 1e6, 1e6, false},
		{"peaked, Q = 3.2", 10, 10, 1e6, 1e6, true},
		{"peaked, Q = 20, unequal GBWs", 4, 20, 1e6, 1e6 / 4, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := composite(tc.ng, tc.g2)
			gbw := []float64{tc.gbw1, tc.g2w}
			f0 := math.Sqrt(tc.gbw1 * tc.g2w / tc.ng)
			q := tc.g2 * math.Sqrt(tc.gbw1/(tc.ng*tc.g2w))
			k := 2 - 1/(q*q)
			want := f0 * math.Sqrt((k+math.Sqrt(k*k+4))/2)
			s := NewSolver(n)
			bw, err := s.Bandwidth(gbw)
			if err != nil {
				t.Fatal(err)
			}
			if e := relErr(bw, want, 0); e > 1e-9 {
				t.Errorf("Q %.4g: bandwidth %.10g Hz, want %.10g (rel %.2g)", q, bw, want, e)
			}
			for _, x := range []float64{0.1, 0.9, 1, 1.5, 10} {
				h, err := s.ACGain(x*f0, gbw)
				if err != nil {
					t.Fatal(err)
				}
				want := complex(tc.ng, 0) / complex(1-x*x, x/q)
				if e := cmplx.Abs(h-want) / cmplx.Abs(want); e > 1e-12 {
					t.Errorf("H(%.4g f0) = %.10g, want %.10g (rel %.2g)", x, h, want, e)
				}
			}
			if tc.peaks {
				fp := f0 * math.Sqrt(1-1/(2*q*q))
				hp, err := s.ACGain(fp, gbw)
				if err != nil {
					t.Fatal(err)
				}
				if cmplx.Abs(hp) <= tc.ng || bw <= fp {
					t.Errorf("peak %.4g at %.4g Hz, DC %.4g, bandwidth %.4g Hz: want a peak above DC below the -3 dB point", cmplx.Abs(hp), fp, tc.ng, bw)
				}
			}
		})
	}
}

func TestACErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name  string
		n     func() *Netlist
		f     float64
		gbw   []float64 // nil: 1 MHz for every op-amp
		is    error
		want  string
		alsoB bool // Bandwidth gives the same error
	}{
		{"negative frequency", func() *Netlist { return mustNew(Inverting, Options{}) }, -1, nil, nil, "at -1 Hz: give a finite frequency", false},
		{"NaN frequency", func() *Netlist { return mustNew(Inverting, Options{}) }, nan, nil, nil, "give a finite frequency", false},
		{"infinite frequency", func() *Netlist { return mustNew(Inverting, Options{}) }, inf, nil, nil, "give a finite frequency", false},
		{"NaN gain-bandwidth", func() *Netlist { return mustNew(InAmp, Options{}) }, 1e3, []float64{1e6, nan, 1e6}, nil, `op-amp "A2" has gain-bandwidth NaN`, true},
		{"floating node", func() *Netlist {
			n := mustNew(NonInverting, Options{})
			n.Resistors[n.Resistor("Rf")].Ohm = inf
			n.Resistors[n.Resistor("Rg")].Ohm = inf
			return n
		}, 1e3, nil, ErrSingular, "has no DC path", true},
		{"zero resistance", func() *Netlist {
			n := mustNew(Difference, Options{})
			n.Resistors[n.Resistor("R2")].Ohm = 0
			return n
		}, 1e3, nil, ErrSingular, `resistor "R2" is 0 ohm`, true},
		{"bad topology", func() *Netlist {
			n := mustNew(Inverting, Options{})
			n.OpAmps[0].Out = n.Node("vin")
			return n
		}, 1e3, nil, ErrTopology, `op-amp "A1" drives node "vin"`, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := tc.n()
			gbw := tc.gbw
			if gbw == nil {
				gbw = make([]float64, len(n.OpAmps))
				for k := range gbw {
					gbw[k] = 1e6
				}
			}
			s := NewSolver(n)
			check := func(what string, err error) {
				t.Helper()
				if err == nil || !strings.Contains(err.Error(), tc.want) || (tc.is != nil && !errors.Is(err, tc.is)) {
					t.Errorf("%s error %v, want one containing %q (wrapping %v)", what, err, tc.want, tc.is)
				}
			}
			_, err := s.ACGain(tc.f, gbw)
			check("ACGain", err)
			if tc.alsoB {
				_, err := s.Bandwidth(gbw)
				check("Bandwidth", err)
			}
		})
	}
	// No excitation: no DC output, so no -3 dB level.
	n := excite(mustNew(InAmp, Options{}), exSignal)
	for i := range n.Sources {
		n.Sources[i].V = 0
	}
	if _, err := NewSolver(n).Bandwidth([]float64{1e6, 1e6, 1e6}); !errors.Is(err, ErrNoResponse) || !strings.Contains(err.Error(), "V(out) is 0 at DC") {
		t.Errorf("Bandwidth of an unexcited circuit: error %v, want ErrNoResponse naming V(out)", err)
	}
	defer func() {
		if r := recover(); r == nil || !strings.HasPrefix(fmt.Sprint(r), "circuit: AC analysis: len(gbw) = 1, want 3") {
			t.Errorf("panic %v, want one naming the gbw length", r)
		}
	}()
	_, _ = NewSolver(mustNew(InAmp, Options{})).ACGain(1, []float64{1e6})
}

// A response the op-amps do not roll off has no -3 dB point: Bandwidth
// says +Inf (the divider alone is flat, as Ohm's law says; with only the
// reference on, the in-amp's input amplifiers see no signal).
func TestBandwidthFlat(t *testing.T) {
	inf := math.Inf(1)
	refOnly := excite(mustNew(InAmp, Options{}), exOffset)
	for k := range refOnly.OpAmps {
		refOnly.OpAmps[k].Vos, refOnly.OpAmps[k].IbPlus, refOnly.OpAmps[k].IbMinus = 0, 0, 0
	}
	refOnly.Sources[refOnly.SourceIndex("vref")].V = 1
	tests := []struct {
		name string
		n    *Netlist
		gbw  []float64
	}{
		{"unbuffered divider", mustNew(Divider, Options{Load: true}), nil},
		{"frequency-independent op-amp", mustNew(NonInverting, Options{}), []float64{0}},
		{"op-amp of infinite GBW", mustNew(Inverting, Options{}), []float64{inf}},
		{"reference only, output stage ideal", refOnly, []float64{1e6, 1e6, 0}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			bw, err := NewSolver(tc.n).Bandwidth(tc.gbw)
			if err != nil || !math.IsInf(bw, 1) {
				t.Errorf("Bandwidth = %g, %v; want +Inf", bw, err)
			}
		})
	}
}

// ACGain and Bandwidth work in fixed-size storage.
func TestACNoAllocs(t *testing.T) {
	n, gbw := loadCellInAmp()
	s := NewSolver(n)
	if a := testing.AllocsPerRun(20, func() { _, _ = s.ACGain(1e3, gbw) }); a != 0 {
		t.Errorf("ACGain: %g allocations per call", a)
	}
	if a := testing.AllocsPerRun(20, func() { _, _ = s.Bandwidth(gbw) }); a != 0 {
		t.Errorf("Bandwidth: %g allocations per call", a)
	}
}

// writeACDeck writes an ngspice deck of n for AC analysis followed by the
// control block: sources, currents, offsets and bias currents with equal DC
// and AC values (zero phase), and each op-amp as the single-pole macro model
// of 1/A = 1/Aol + j f/GBW: a VCVS of gain Aol, controlled by
// (Plus + Vos, Minus), into a 1k-C low-pass whose pole is GBW/Aol, then a
// unity VCVS buffer to the output. Aol = +Inf is a VCCS of 1 S into
// C = 1/(2π GBW) (an integrator); a frequency-independent op-amp is a plain
// VCVS of gain Aol (SPICEInfGain for +Inf), as WriteSPICE writes it.
func writeACDeck(w io.Writer, n *Netlist, gbw []float64, control string) error {
	if err := n.checkSPICE(); err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	nodes := n.spiceNodes()
	fmt.Fprintf(bw, "* plumb circuit %s, AC\n", n.Family)
	for _, r := range n.Resistors {
		fmt.Fprintf(bw, "%s %s %s %s\n", spiceName('R', r.Name), nodes[r.A], nodes[r.B], spiceNum(r.Ohm))
	}
	both := func(v float64) string { return "DC " + spiceNum(v) + " AC " + spiceNum(v) }
	for _, v := range n.Sources {
		fmt.Fprintf(bw, "%s %s 0 %s\n", spiceName('V', v.Name), nodes[v.Node], both(v.V))
	}
	for _, c := range n.Currents {
		fmt.Fprintf(bw, "%s %s %s %s\n", spiceName('I', c.Name), nodes[c.From], nodes[c.To], both(c.A))
	}
	const rPole = 1e3
	for k, a := range n.OpAmps {
		id := strings.ToLower(spiceSafe(a.Name))
		plus, minus, out := id+"_vos", nodes[a.Minus], nodes[a.Out]
		fmt.Fprintf(bw, "VOS_%s %s %s %s\n", id, plus, nodes[a.Plus], both(a.Vos))
		fmt.Fprintf(bw, "IBP_%s %s 0 %s\nIBM_%s %s 0 %s\n", id, nodes[a.Plus], both(a.IbPlus), id, nodes[a.Minus], both(a.IbMinus))
		g := gbw[k]
		switch {
		case !(g > 0) || math.IsInf(g, 1):
			gain := a.Gain
			if math.IsInf(gain, 1) {
				gain = SPICEInfGain
			}
			fmt.Fprintf(bw, "E%s %s 0 %s %s %s\n", id, out, plus, minus, spiceNum(gain))
			continue
		case math.IsInf(a.Gain, 1):
			fmt.Fprintf(bw, "G%s_int 0 %s_y %s %s 1\n", id, id, plus, minus)
			fmt.Fprintf(bw, "C%s_int %s_y 0 %s\n", id, id, spiceNum(1/(2*math.Pi*g)))
		default:
			fmt.Fprintf(bw, "E%s_gain %s_x 0 %s %s %s\n", id, id, plus, minus, spiceNum(a.Gain))
			fmt.Fprintf(bw, "R%s_pole %s_x %s_y %s\n", id, id, id, spiceNum(rPole))
			fmt.Fprintf(bw, "C%s_pole %s_y 0 %s\n", id, id, spiceNum(a.Gain/(2*math.Pi*rPole*g)))
		}
		fmt.Fprintf(bw, "E%s_buf %s 0 %s_y 0 1\n", id, out, id)
	}
	fmt.Fprintf(bw, ".control\nset numdgt=15\n%squit 0\n.endc\n.end\n", control)
	return bw.Flush()
}

// runACDeck runs ngspice in batch mode on deck and returns every printed
// "name = value" line by name (a later line wins), or an error with
// ngspice's output.
func runACDeck(path, dir string, deck []byte) (map[string]float64, error) {
	file := filepath.Join(dir, "ac.cir")
	if err := os.WriteFile(file, deck, 0o644); err != nil {
		return nil, err
	}
	out, err := exec.Command(path, "-b", file).CombinedOutput()
	if err != nil {
		return nil, fmt.Errorf("ngspice: %v\n%s", err, out)
	}
	v := map[string]float64{}
	for _, line := range strings.Split(string(out), "\n") {
		if f := strings.Fields(line); len(f) == 3 && f[1] == "=" {
			if x, err := strconv.ParseFloat(f[2], 64); err == nil {
				v[f[0]] = x
			}
		}
	}
	return v, nil
}

// acCase is one netlist of the ngspice AC comparison with this package's
// results for it.
type acCase struct {
	label string
	n     *Netlist
	gbw   []float64
	bw    float64   // Bandwidth, Hz (+Inf: none)
	freqs []float64 // where H is compared
	h     []complex128
}

// acCases returns the cases of one group of the ngspice AC comparison:
// casesPerFamily random circuits of family f (all option combinations, a
// test current on odd cases, one op-amp frequency-independent on every
// eighth), each with every excitation on and with the signal input alone;
// for f == "composite", random composite amplifiers.
func acCases(t *testing.T, f Family, r *rand.Rand, casesPerFamily int) []acCase {
	var out []acCase
	gains := []float64{1e4, 1e5, 1e6, 1e7, math.Inf(1)}
	for c := range casesPerFamily {
		var base *Netlist
		if f == "composite" {
			base = composite(1.5+r.Float64()*20, 1+float64(r.IntN(3))*r.Float64()*20)
			for k := range base.OpAmps {
				base.OpAmps[k].Gain = gains[r.IntN(len(gains))]
				base.OpAmps[k].Vos = (r.Float64()*2 - 1) * 1e-3
			}
		} else {
			base = randomCase(f, c, r)
		}
		if f == InAmp && c%10 == 9 {
			base.Resistors[base.Resistor("Rg")].Ohm = math.Inf(1) // unity first stage
		}
		frozen := -1
		if c%8 == 7 {
			frozen = r.IntN(max(1, len(base.OpAmps)))
		}
		gbw := randomGBW(base, r, frozen)
		for k, a := range base.OpAmps {
			if math.IsInf(a.Gain, 1) && !(gbw[k] > 0 && !math.IsInf(gbw[k], 1)) {
				// SPICE has no infinite gain; both sides take this one.
				base.OpAmps[k].Gain = spiceTestGain
			}
		}
		for _, e := range []excitation{exAll, exSignal} {
			n := excite(base, e)
			s := NewSolver(n)
			bw, err := s.Bandwidth(gbw)
			if err != nil {
				t.Fatalf("%s case %d: %v", f, c, err)
			}
			cs := acCase{label: fmt.Sprintf("%s case %d excitation %d%s gbw %.4g", f, c, e, gainsOf(n), gbw), n: n, gbw: gbw, bw: bw}
			cs.freqs = []float64{1e2, 1e4, 1e6, 1e8}
			if !math.IsInf(bw, 1) {
				cs.freqs = []float64{0.01 * bw, 0.3 * bw, bw, 3 * bw, 30 * bw}
			}
			for _, fr := range cs.freqs {
				h, err := s.ACGain(fr, gbw)
				if err != nil {
					t.Fatalf("%s: %v", cs.label, err)
				}
				cs.h = append(cs.h, h)
			}
			out = append(out, cs)
		}
	}
	return out
}

// TestACAgainstNgspice compares ACGain and Bandwidth with ngspice's AC
// analysis (a circuit simulator written outside the project, run in batch
// mode) of the same netlists with the single-pole macro model of
// writeACDeck, on seeded random circuits of every family and option
// combination and on random composite amplifiers (two op-amps in one loop,
// some peaking): the complex output at five frequencies around the -3 dB
// point, and the -3 dB frequency itself.
//
// ngspice's -3 dB point is its own: `meas ... when |H|/|H(0)| = 1/√2
// fall=1`, with H(0) its operating point, on a sweep of 20000 points a
// decade over ±1 % about ours. meas interpolates linearly between sweep
// points, which puts its crossing off by about (Δf/f)² = 1e-8 at that
// spacing (at 2000 a decade, peaked responses were off by 1e-6), and it
// keeps 7 digits, so the comparison is at 1e-6, inside the 1e-4 asked. A
// second, coarse sweep from 1e-6 x to 0.99 x our -3 dB point checks that
// ngspice's response stays above the level there (so the crossing found is
// the lowest, at the sweep's resolution of ten points a decade). The
// magnitude at our -3 dB frequency, compared at 1e-7 with the other points,
// pins it more tightly still: d ln|H|/d ln f is about -1/2 there.
func TestACAgainstNgspice(t *testing.T) {
	path := ngspicePath(t, "the AC cross-check against it")
	const (
		casesPerFamily = 32
		// Relative, on the complex output (magnitude and phase). ngspice's
		// own rounding grows with the op-amp gain (see SPICEInfGain): a
		// frequency-independent VCVS of gain 1e7 costs it 2e-9, and where
		// the imaginary part is 1e-8 of the real part (100 Hz, a composite
		// amplifier of gains 1e5) it is off by 2^-22 V, 2e-8 of |H|.
		tolH = 1e-7
		// Relative, on ngspice's meas of the -3 dB point, which keeps its
		// result to 7 significant digits (up to 5e-7).
		tolBW = 1e-6
	)
	r := rand.New(rand.NewPCG(8, 21))
	var cases []acCase
	for _, f := range append(Families(), "composite") {
		cases = append(cases, acCases(t, f, r, casesPerFamily)...)
	}
	// One small deck per case: an AC point costs ngspice a solve of the
	// whole deck, so merged copies would make the cost quadratic.
	results := make([]map[string]float64, len(cases))
	errs := make([]error, len(cases))
	var wg sync.WaitGroup
	next := make(chan int)
	for range runtime.NumCPU() {
		dir := t.TempDir()
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				var deck bytes.Buffer
				if errs[i] = writeACDeck(&deck, cases[i].n, cases[i].gbw, acControl(cases[i])); errs[i] == nil {
					results[i], errs[i] = runACDeck(path, dir, deck.Bytes())
				}
			}
		}()
	}
	for i := range cases {
		next <- i
	}
	close(next)
	wg.Wait()
	worstH, worstBW, worstPh := 0.0, 0.0, 0.0
	var worstHAt, worstBWAt string
	for i, c := range cases {
		if errs[i] != nil {
			t.Fatalf("%s: %v", c.label, errs[i])
		}
		value := func(name string) float64 {
			v, ok := results[i][name]
			if !ok {
				t.Fatalf("%s: ngspice printed no %s", c.label, name)
			}
			return v
		}
		scale := math.Abs(value("h0"))
		for j, fr := range c.freqs {
			want := complex(value(fmt.Sprintf("hr_%d", j)), value(fmt.Sprintf("hi_%d", j)))
			e := cmplx.Abs(c.h[j]-want) / max(cmplx.Abs(want), 1e-6*scale)
			ph := math.Abs(cmplx.Phase(c.h[j] / want))
			if e > tolH || ph > tolH || math.IsNaN(e) {
				t.Errorf("%s: H(%.6g Hz) = %.12g, ngspice %.12g (rel %.2g, phase %.2g rad)", c.label, fr, c.h[j], want, e, ph)
			}
			if e > worstH {
				worstH, worstHAt = e, fmt.Sprintf("%s at %.4g Hz", c.label, fr)
			}
			worstPh = max(worstPh, ph)
		}
		if math.IsInf(c.bw, 1) {
			continue
		}
		if e := relErr(c.bw, value("bw"), 0); e > tolBW || math.IsNaN(e) {
			t.Errorf("%s: bandwidth %.10g Hz, ngspice %.10g (rel %.2g)", c.label, c.bw, value("bw"), e)
		} else if e > worstBW {
			worstBW, worstBWAt = e, c.label
		}
		if lo := value("lo"); !(lo > 1/math.Sqrt2) {
			t.Errorf("%s: ngspice's |H|/|H(0)| falls to %.6g below 0.99 x the bandwidth %.6g Hz", c.label, lo, c.bw)
		}
	}
	t.Logf("%d cases against ngspice AC: worst complex difference %.3g (%s), phase %.3g rad; worst -3 dB difference %.3g (%s)",
		len(cases), worstH, worstHAt, worstPh, worstBW, worstBWAt)
}

// ngspicePath returns ngspice's path, or skips the test (naming what is
// skipped) when it is not on PATH, or fails it when PLUMB_REQUIRE_TOOLS=1.
func ngspicePath(t *testing.T, what string) string {
	t.Helper()
	path, err := exec.LookPath("ngspice")
	if err == nil {
		return path
	}
	if os.Getenv("PLUMB_REQUIRE_TOOLS") == "1" {
		t.Fatal("ngspice not found on PATH and PLUMB_REQUIRE_TOOLS=1 (CI installs it)")
	}
	t.Skip("ngspice not found on PATH; skipping " + what)
	return ""
}

// acControl is the ngspice control block of case c: the operating point
// h0, the -3 dB point bw measured on a fine sweep about ours, the smallest
// |H|/|H(0)| lo below it, and H at each comparison frequency as hr_j, hi_j.
func acControl(c acCase) string {
	var b strings.Builder
	out := c.n.spiceNodes()[c.n.Out]
	fmt.Fprintf(&b, "op\nlet h0 = %s\nprint h0\n", out)
	if !math.IsInf(c.bw, 1) {
		fmt.Fprintf(&b, "ac dec 20000 %s %s\nlet r = vm(%s)/abs(op1.h0)\nmeas ac bw when r=0.70710678118654752 fall=1\nprint bw\n",
			spiceNum(c.bw/1.01), spiceNum(c.bw*1.01), out)
		fmt.Fprintf(&b, "ac dec 10 %s %s\nlet lo = vecmin(vm(%s))/abs(op1.h0)\nprint lo\n", spiceNum(c.bw*1e-6), spiceNum(c.bw*0.99), out)
	}
	for j, fr := range c.freqs {
		fmt.Fprintf(&b, "ac lin 1 %s %s\nlet hr_%d = vr(%s)\nlet hi_%d = vi(%s)\nprint hr_%d hi_%d\n", spiceNum(fr), spiceNum(fr), j, out, j, out, j, j)
	}
	return b.String()
}

// ExampleSolver_Bandwidth: the load-cell in-amp of TestLoadCellInAmpBandwidth
// is 3 dB down at GBW/201, half the GBW/101 of either input amplifier's loop
// taken alone.
func ExampleSolver_Bandwidth() {
	n, gbw := loadCellInAmp()
	bw, err := NewSolver(n).Bandwidth(gbw)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("-3 dB at %.1f Hz\n", bw)
	// Output: -3 dB at 2985.1 Hz
}

// BenchmarkBandwidthInAmp is one -3 dB search of the load-cell in-amp
// (9 unknowns with its source impedances), as the search runs once per
// candidate.
func BenchmarkBandwidthInAmp(b *testing.B) {
	n, gbw := loadCellInAmp()
	s := NewSolver(n)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := s.Bandwidth(gbw); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkACGainInAmp is one AC solve of the load-cell in-amp, with its
// Factor and matrix assembly.
func BenchmarkACGainInAmp(b *testing.B) {
	n, gbw := loadCellInAmp()
	s := NewSolver(n)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := s.ACGain(2985, gbw); err != nil {
			b.Fatal(err)
		}
	}
}
