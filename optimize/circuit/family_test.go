package circuit

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// outFor sets the named sources (all others zero, no currents, Vos or Ib)
// and returns the output voltage.
func outFor(t *testing.T, n *Netlist, volts map[string]float64) float64 {
	t.Helper()
	c := excite(n, exOffset)
	for i := range c.OpAmps {
		c.OpAmps[i].Vos, c.OpAmps[i].IbPlus, c.OpAmps[i].IbMinus = 0, 0, 0
	}
	for name, v := range volts {
		k := c.SourceIndex(name)
		if k < 0 {
			t.Fatalf("no source %q in %s", name, n.Family)
		}
		c.Sources[k].V = v
	}
	s := NewSolver(c)
	if err := s.Factor(); err != nil {
		t.Fatal(err)
	}
	return s.SolveOut()
}

// set assigns resistor values by position name.
func set(t *testing.T, n *Netlist, ohms map[string]float64) {
	t.Helper()
	for name, v := range ohms {
		k := n.Resistor(name)
		if k < 0 {
			t.Fatalf("no resistor %q in %s", name, n.Family)
		}
		n.Resistors[k].Ohm = v
	}
}

func setGain(n *Netlist, a float64) {
	for i := range n.OpAmps {
		n.OpAmps[i].Gain = a
	}
}

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if e := relErr(got, want, 1e-12); e > tol || math.IsNaN(got) {
		t.Errorf("%s = %.12g, want %.12g (rel %.2g > %.2g)", what, got, want, e, tol)
	}
}

// Closed-loop gains of the inverting and non-inverting amplifiers, ideal
// and at finite open-loop gain A: G = -Rf/Rg and 1 + Rf/Rg, and
// G/(1 + NG/A) with noise gain NG = 1 + Rf/Rg (S. Franco, "Design with
// Operational Amplifiers and Analog Integrated Circuits", ch. 1, from
// memory; the same equations are in the project's domain notes §2).
func TestAmplifierGains(t *testing.T) {
	inf := math.Inf(1)
	tests := []struct {
		name   string
		f      Family
		rf, rg float64
		a      float64
	}{
		{"inverting x10 ideal", Inverting, 100e3, 10e3, inf},
		{"inverting x1 ideal", Inverting, 10e3, 10e3, inf},
		{"inverting x0.249 ideal", Inverting, 2.49e3, 10e3, inf},
		{"inverting x10 A=1e5", Inverting, 100e3, 10e3, 1e5},
		{"inverting x100 A=1e4", Inverting, 1e6, 10e3, 1e4},
		{"noninverting x10 ideal", NonInverting, 90e3, 10e3, inf},
		{"noninverting x2 ideal", NonInverting, 10e3, 10e3, inf},
		{"noninverting x10 A=1e5", NonInverting, 90e3, 10e3, 1e5},
		{"noninverting x1001 A=1e6", NonInverting, 1e6, 1e3, 1e6},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := mustNew(tc.f, Options{})
			set(t, n, map[string]float64{"Rf": tc.rf, "Rg": tc.rg})
			setGain(n, tc.a)
			ng := 1 + tc.rf/tc.rg
			g := ng
			if tc.f == Inverting {
				g = -tc.rf / tc.rg
			}
			want := g / (1 + ng/tc.a)
			near(t, "Vout/Vin", outFor(t, n, map[string]float64{"vin": 1}), want, 1e-12)
			// The reference sees the complementary gain: 1 + Rf/Rg for the
			// inverting stage's + input, -Rf/Rg for the non-inverting stage's
			// Rg return (superposition; Franco ch. 1, from memory).
			wantRef := (1 + tc.rf/tc.rg) / (1 + ng/tc.a)
			if tc.f == NonInverting {
				wantRef = -tc.rf / tc.rg / (1 + ng/tc.a)
			}
			near(t, "Vout/Vref", outFor(t, n, map[string]float64{"vref": 1}), wantRef, 1e-12)
		})
	}
}

// Noise gain 10 at A = 1e5 gives a gain error of about 100 ppm (Franco,
// ch. 1, from memory; domain notes §6).
func TestFiniteGainErrorCheckValue(t *testing.T) {
	n := mustNew(NonInverting, Options{})
	set(t, n, map[string]float64{"Rf": 90e3, "Rg": 10e3})
	setGain(n, 1e5)
	g := outFor(t, n, map[string]float64{"vin": 1})
	ppm := (1 - g/10) * 1e6
	if math.Abs(ppm-100) > 0.1 {
		t.Errorf("gain error %.4f ppm, want about 100 ppm", ppm)
	}
}

// diffVout is the ideal difference-amplifier equation of the domain notes
// §2 (Franco, chapter on the difference amplifier, from memory).
func diffVout(r1, r2, r3, r4, vp, vn, vref float64) float64 {
	k := r4 / (r3 + r4) * (1 + r2/r1)
	return vp*k - vn*r2/r1 + vref*r3/(r3+r4)*(1+r2/r1)
}

func TestDifferenceEquation(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 1))
	for i := range 200 {
		n := mustNew(Difference, Options{})
		setGain(n, math.Inf(1))
		rs := [4]float64{}
		for j := range rs {
			rs[j] = 1e3 * math.Exp(r.Float64()*6)
		}
		set(t, n, map[string]float64{"R1": rs[0], "R2": rs[1], "R3": rs[2], "R4": rs[3]})
		vp, vn, vref := r.Float64()*10-5, r.Float64()*10-5, r.Float64()*5
		got := outFor(t, n, map[string]float64{"vp": vp, "vn": vn, "vref": vref})
		want := diffVout(rs[0], rs[1], rs[2], rs[3], vp, vn, vref)
		if e := relErr(got, want, 1e-9); e > 1e-12 {
			t.Errorf("case %d: Vout %.15g, equation %.15g", i, got, want)
		}
	}
}

// cmrr returns |Adm/Acm| of a difference-type netlist from two solves.
func cmrr(t *testing.T, n *Netlist, plus, minus string) float64 {
	adm := outFor(t, n, map[string]float64{plus: 0.5, minus: -0.5})
	acm := outFor(t, n, map[string]float64{plus: 1, minus: 1})
	return math.Abs(adm / acm)
}

// Worst-case resistor-limited CMRR of a difference amplifier: (1+G)/(4t)
// for four resistors of tolerance t at the corners that oppose the two
// ratios (Franco, chapter on the difference amplifier, from memory; check
// values in the domain notes §6: unity gain with 1 % gives 50, about 34 dB;
// gain 10 with 0.1 % gives 2750, about 68.8 dB). The first-order form is
// exact only as t -> 0, so the check allows 3 %.
func TestDifferenceCMRR(t *testing.T) {
	tests := []struct {
		name string
		g, t float64
		want float64
	}{
		{"unity gain 1 %", 1, 0.01, 50},
		{"gain 10 0.1 %", 10, 0.001, 2750},
		{"gain 100 0.01 %", 100, 0.0001, 101 / 0.0004},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := mustNew(Difference, Options{})
			setGain(n, math.Inf(1))
			r1 := 10e3
			set(t, n, map[string]float64{
				"R1": r1 * (1 + tc.t), "R2": tc.g * r1 * (1 - tc.t),
				"R3": r1 * (1 - tc.t), "R4": tc.g * r1 * (1 + tc.t),
			})
			got := cmrr(t, n, "vp", "vn")
			if math.Abs(got/tc.want-1) > 0.03 {
				t.Errorf("CMRR %.1f (%.1f dB), want about %.1f", got, 20*math.Log10(got), tc.want)
			}
		})
	}
}

// Small-mismatch form: with R2/R1 = G(1+a) and R4/R3 = G(1+b),
// Acm = G(b-a)/(1+G) to first order, so CMRR = (1+G)/|b-a| (domain notes
// §2, Franco, from memory). Rule of thumb (common practice): a unity-gain
// stage whose ratios differ by 2 % puts about 100 mV at the output for 10 V
// of common mode.
func TestDifferenceMismatch(t *testing.T) {
	tests := []struct {
		name string
		g    float64
		a, b float64
	}{
		{"unity 2 % apart", 1, -0.01, 0.01},
		{"gain 10 1e-4", 10, 0, 1e-4},
		{"gain 0.5 -3e-5", 0.5, 2e-5, -1e-5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := mustNew(Difference, Options{})
			setGain(n, math.Inf(1))
			set(t, n, map[string]float64{"R1": 10e3, "R2": 10e3 * tc.g * (1 + tc.a), "R3": 10e3, "R4": 10e3 * tc.g * (1 + tc.b)})
			acm := outFor(t, n, map[string]float64{"vp": 1, "vn": 1})
			want := tc.g * (tc.b - tc.a) / (1 + tc.g)
			if math.Abs(acm/want-1) > 2*math.Max(math.Abs(tc.a), math.Abs(tc.b))+1e-9 {
				t.Errorf("Acm %.6g, first-order form %.6g", acm, want)
			}
			if tc.name == "unity 2 % apart" {
				if out := 10 * acm; math.Abs(out-0.1) > 0.002 {
					t.Errorf("10 V common mode gives %.4f V at the output, want about 0.100 V", out)
				}
			}
		})
	}
}

// A reference divider is its Thevenin equivalent, Vth = Vsrc Rb/(Ra+Rb) in
// series with Ra||Rb (Thevenin's theorem, any circuits textbook), so the
// stage with the divider must equal the stage with an ideal reference of
// Vth and R4 + Ra||Rb.
func TestReferenceDividerThevenin(t *testing.T) {
	for _, f := range []Family{Difference, CurrentSense} {
		t.Run(string(f), func(t *testing.T) {
			d := mustNew(f, Options{RefDivider: true})
			randomize(d, rand.New(rand.NewPCG(4, 4)))
			ra, rb := d.Resistors[d.Resistor("Ra")].Ohm, d.Resistors[d.Resistor("Rb")].Ohm
			p := mustNew(f, Options{})
			copyValues(p, d)
			p.Resistors[p.Resistor("R4")].Ohm += ra * rb / (ra + rb)
			p.Sources[p.SourceIndex("vref")].V = d.Sources[d.SourceIndex("vrefsrc")].V * rb / (ra + rb)
			sameOut(t, d, p)
		})
	}
}

// TestReferenceImpedanceSeries: the reference source's resistance Rref
// is in series with the stage's reference resistor (R4; R2 of a level
// shift), so the stage with Rref solves as the stage without it whose
// reference resistor is larger by Rref (series resistors add, Ohm's law).
func TestReferenceImpedanceSeries(t *testing.T) {
	tests := []struct {
		f      Family
		o      Options
		series string
	}{
		{Difference, Options{}, "R4"},
		{CurrentSense, Options{}, "R4"},
		{InAmp, Options{}, "R4"},
		{LevelShift, Options{}, "R2"},
		{LevelShift, Options{OffsetToInverting: true}, "R2"},
	}
	for _, tc := range tests {
		name := string(tc.f)
		if tc.o.OffsetToInverting {
			name += " inverting side"
		}
		t.Run(name, func(t *testing.T) {
			wo := tc.o
			wo.RefImpedance = true
			d := mustNew(tc.f, wo)
			randomize(d, rand.New(rand.NewPCG(6, 2)))
			p := mustNew(tc.f, tc.o)
			copyValues(p, d)
			p.Resistors[p.Resistor(tc.series)].Ohm += d.Resistors[d.Resistor("Rref")].Ohm
			sameOut(t, d, p)
		})
	}
}

// Divider: Vout/Vin = Rbot/(Rtop+Rbot), loaded: Rbot||Rload in place of
// Rbot (any circuits textbook); the ideal buffer changes nothing, and a
// leakage current I out of the unbuffered tap subtracts I (Rtop||Rbot),
// while behind a buffer it comes from the buffer's output.
func TestDivider(t *testing.T) {
	par := func(a, b float64) float64 { return a * b / (a + b) }
	tests := []struct {
		name string
		o    Options
	}{
		{"bare", Options{}},
		{"loaded", Options{Load: true}},
		{"buffered", Options{Buffer: true}},
		{"buffered and loaded", Options{Buffer: true, Load: true}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := mustNew(Divider, tc.o)
			setGain(n, math.Inf(1))
			top, bot := 90.9e3, 10e3
			set(t, n, map[string]float64{"Rtop": top, "Rbot": bot})
			if tc.o.Load && !tc.o.Buffer {
				bot = par(bot, n.Resistors[n.Resistor("Rload")].Ohm)
			}
			near(t, "Vout/Vin", outFor(t, n, map[string]float64{"vin": 1}), bot/(top+bot), 1e-13)
			n.Currents[n.CurrentIndex("iload")].A = 1e-6
			v, err := solveAll(n)
			if err != nil {
				t.Fatal(err)
			}
			want := n.Sources[0].V*bot/(top+bot) - 1e-6*par(top, bot)
			if tc.o.Buffer {
				want = n.Sources[0].V * bot / (top + bot) // the buffer supplies it
			}
			near(t, "Vout with leakage", v[n.Out], want, 1e-13)
		})
	}
}

// Current sense: Vout = I Rs R2/R1 with R4/R3 = R2/R1 (domain notes §2),
// exact when the difference stage does not load the shunt, approached here
// with gigaohm resistors (loading 1e-11); the bus voltage is common mode and
// leaves the output at zero.
func TestCurrentSense(t *testing.T) {
	n := mustNew(CurrentSense, Options{})
	setGain(n, math.Inf(1))
	set(t, n, map[string]float64{"Rs": 0.005, "R1": 1e9, "R3": 1e9, "R2": 50e9, "R4": 50e9})
	n.Currents[n.CurrentIndex("isense")].A = 3
	n.Sources[n.SourceIndex("vbus")].V = 48
	v, err := solveAll(n)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "Vout", v[n.Out], 3*0.005*50, 1e-9)
}

// Level shift: the summing equations in New's comment, derived by
// superposition and the ideal virtual short (Franco ch. 1, from memory),
// and the nominal mappings they are meant to give.
func TestLevelShift(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	for _, inv := range []bool{false, true} {
		n := mustNew(LevelShift, Options{OffsetToInverting: inv})
		setGain(n, math.Inf(1))
		// Nominal mapping: -10..10 V onto 0..2.5 V, or 0.5..4.5 V onto 0..3.3 V.
		lo, hi, want0, want1 := -10.0, 10.0, 0.0, 2.5
		if inv {
			lo, hi, want0, want1 = 0.5, 4.5, 0, 3.3
		}
		if got := outFor(t, n, map[string]float64{"vin": lo, "vref": 2.5}); math.Abs(got-want0) > 1e-3 {
			t.Errorf("inverting-side %v: Vout(%g V) = %.5f, want %g", inv, lo, got, want0)
		}
		if got := outFor(t, n, map[string]float64{"vin": hi, "vref": 2.5}); math.Abs(got-want1) > 1e-3 {
			t.Errorf("inverting-side %v: Vout(%g V) = %.5f, want %g", inv, hi, got, want1)
		}
		for i := range 50 {
			for j := range n.Resistors {
				n.Resistors[j].Ohm = 1e3 * math.Exp(r.Float64()*5)
			}
			o := func(name string) float64 { return n.Resistors[n.Resistor(name)].Ohm }
			r1, r2, r3, rg, rf := o("R1"), o("R2"), o("R3"), o("Rg"), o("Rf")
			vin, vref := r.Float64()*10-5, r.Float64()*5
			var want float64
			if inv {
				want = vin*r3/(r1+r3)*(1+rf/rg+rf/r2) - vref*rf/r2
			} else {
				want = (1 + rf/rg) * (vin/r1 + vref/r2) / (1/r1 + 1/r2 + 1/r3)
			}
			got := outFor(t, n, map[string]float64{"vin": vin, "vref": vref})
			if e := relErr(got, want, 1e-9); e > 1e-12 {
				t.Errorf("inverting-side %v case %d: Vout %.15g, equation %.15g", inv, i, got, want)
			}
		}
	}
}

// Three-op-amp instrumentation amplifier: the first stage has gain
// 1 + 2Rf/Rg on the difference and unity on common mode, the whole
// (1 + 2Rf/Rg) R2/R1 with matched R1..R4 (domain notes §2; Franco,
// chapter on instrumentation amplifiers, from memory).
func TestInAmp(t *testing.T) {
	tests := []struct {
		name       string
		rf, rg, g2 float64
	}{
		{"gain 10", 18e3, 4e3, 1},
		{"gain 101", 25e3, 500, 1},
		{"gain 1 (Rg open)", 25e3, math.Inf(1), 1},
		{"gain 20 with second stage 2", 4.5e3, 1e3, 2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			n := mustNew(InAmp, Options{})
			setGain(n, math.Inf(1))
			set(t, n, map[string]float64{"Rf1": tc.rf, "Rf2": tc.rf, "Rg": tc.rg, "R1": 10e3, "R3": 10e3, "R2": 10e3 * tc.g2, "R4": 10e3 * tc.g2})
			g1 := 1 + 2*tc.rf/tc.rg
			c := excite(n, exOffset)
			c.Sources[c.SourceIndex("vp")].V = 0.3
			c.Sources[c.SourceIndex("vn")].V = 0.1
			v, err := solveAll(c)
			if err != nil {
				t.Fatal(err)
			}
			near(t, "first stage V(o1)-V(o2)", v[c.Node("o1")]-v[c.Node("o2")], g1*0.2, 1e-12)
			near(t, "Vout", v[c.Out], g1*tc.g2*0.2, 1e-12)
			c.Sources[c.SourceIndex("vp")].V = 2
			c.Sources[c.SourceIndex("vn")].V = 2
			if v, err = solveAll(c); err != nil {
				t.Fatal(err)
			}
			near(t, "first stage common mode V(o1)", v[c.Node("o1")], 2, 1e-12)
			near(t, "first stage common mode V(o2)", v[c.Node("o2")], 2, 1e-12)
			if math.Abs(v[c.Out]) > 1e-12 {
				t.Errorf("common-mode output %.3g V, want 0 with matched resistors", v[c.Out])
			}
		})
	}
}

func TestParseFamily(t *testing.T) {
	for _, f := range Families() {
		got, err := ParseFamily(" " + string(f) + " ")
		if err != nil || got != f {
			t.Errorf("ParseFamily(%q) = %q, %v", f, got, err)
		}
	}
	if _, err := ParseFamily("Inverting"); err != nil {
		t.Errorf("case-insensitive parse failed: %v", err)
	}
	_, err := ParseFamily("bridge")
	if !errors.Is(err, ErrFamily) {
		t.Fatalf("ParseFamily(bridge) error %v, want ErrFamily", err)
	}
	want := `circuit: unknown circuit family "bridge": use one of inverting, noninverting, difference, divider, current-sense, level-shift, inamp, strapped, strapped-single`
	if err.Error() != want {
		t.Errorf("message %q\nwant %q", err, want)
	}
	if _, err := New("bridge", Options{}); !errors.Is(err, ErrFamily) {
		t.Errorf("New(bridge) error %v, want ErrFamily", err)
	}
}

func TestNewOptions(t *testing.T) {
	tests := []struct {
		name string
		f    Family
		o    Options
		ok   bool
	}{
		{"divider buffer", Divider, Options{Buffer: true}, true},
		{"inverting buffer", Inverting, Options{Buffer: true}, false},
		{"current-sense source impedance", CurrentSense, Options{SourceImpedance: true}, false},
		{"inamp reference divider", InAmp, Options{RefDivider: true}, false},
		{"difference reference divider", Difference, Options{RefDivider: true}, true},
		{"level-shift inverting side", LevelShift, Options{OffsetToInverting: true}, true},
		{"difference inverting side", Difference, Options{OffsetToInverting: true}, false},
		{"inverting reference impedance", Inverting, Options{RefImpedance: true}, false},
		{"divider reference impedance", Divider, Options{RefImpedance: true}, false},
		{"inamp reference impedance", InAmp, Options{RefImpedance: true}, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := New(tc.f, tc.o)
			if tc.ok != (err == nil) || (err != nil && !errors.Is(err, ErrOption)) {
				t.Errorf("New(%s, %+v) error %v", tc.f, tc.o, err)
			}
		})
	}
}

// Every family and option combination builds a netlist whose positions,
// sources and op-amps are where the documentation says, and which solves.
func TestNewTopologies(t *testing.T) {
	for _, f := range Families() {
		for _, o := range variants(f) {
			n := mustNew(f, o)
			if n.Nodes[0] != "0" || n.Nodes[n.Out] != "out" || n.Family != f {
				t.Errorf("%s %+v: ground %q, output %q", f, o, n.Nodes[0], n.Nodes[n.Out])
			}
			if o.Load && n.Resistor("Rload") < 0 {
				t.Errorf("%s %+v: no Rload", f, o)
			}
			if o.SourceImpedance && n.Resistor("Rsrc") < 0 && n.Resistor("Rsrcp") < 0 {
				t.Errorf("%s %+v: no source resistance", f, o)
			}
			if _, err := solveAll(n); err != nil {
				t.Errorf("%s %+v: %v", f, o, err)
			}
		}
	}
}

// copyValues gives netlist p the values of d, element by element: resistors
// and sources by name (where d has one of that name), currents and op-amps
// by index (the two netlists are variants of one family).
func copyValues(p, d *Netlist) {
	for i, r := range p.Resistors {
		if k := d.Resistor(r.Name); k >= 0 {
			p.Resistors[i].Ohm = d.Resistors[k].Ohm
		}
	}
	for i, src := range p.Sources {
		if k := d.SourceIndex(src.Name); k >= 0 {
			p.Sources[i].V = d.Sources[k].V
		}
	}
	for i := range p.Currents {
		p.Currents[i].A = d.Currents[i].A
	}
	for i, a := range d.OpAmps {
		p.OpAmps[i].Gain, p.OpAmps[i].Vos = a.Gain, a.Vos
		p.OpAmps[i].IbPlus, p.OpAmps[i].IbMinus = a.IbPlus, a.IbMinus
	}
}

// sameOut solves d and p and requires the same output voltage.
func sameOut(t *testing.T, d, p *Netlist) {
	t.Helper()
	vd, err := solveAll(d)
	if err != nil {
		t.Fatal(err)
	}
	vp, err := solveAll(p)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "Vout", vd[d.Out], vp[p.Out], 1e-12)
}
