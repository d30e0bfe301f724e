package spec

import (
	"strconv"

	"go.yaml.in/yaml/v3"

	"plumb/catalog"
	"plumb/catalog/units"
)

// num formats v to 12 significant figures, dropping the rounding residue
// of unit conversions (100 ppm/K held as 1e-4 per K prints as 100).
func num(v float64) string {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 12, 64), 64)
	return strconv.FormatFloat(r, 'g', -1, 64)
}

// Marshal writes the design in the design-file layout (data/examples
// README): catalog references by part number, inline figures with their
// units. ParseDesign reads it back.
func (d *Design) Marshal() ([]byte, error) {
	var r rawDesign
	r.Name, r.Family, r.Options = d.Name, d.Family, d.Options
	if len(d.Positions) > 0 {
		r.Positions = map[string]rawPosition{}
	}
	for _, p := range d.Positions {
		var rp rawPosition
		switch p.Pair {
		case Series:
			for _, e := range p.Elements {
				rp.Series = append(rp.Series, rawOf(e))
			}
		case Parallel:
			for _, e := range p.Elements {
				rp.Parallel = append(rp.Parallel, rawOf(e))
			}
		default:
			if len(p.Elements) > 0 {
				rp.rawElement = rawOf(p.Elements[0])
			}
		}
		r.Positions[p.Name] = rp
	}
	r.Amplifier = rawAmpOf(&d.Amplifier, d)
	if d.Reference != nil {
		r.Reference = &rawDesignRef{Part: d.Reference.Part}
	}
	return yaml.Marshal(&r)
}

// rawOf writes an element as a catalog reference when it has one, else as
// inline figures.
func rawOf(e Element) rawElement {
	switch {
	case e.Network != "":
		return rawElement{Network: e.Network, Element: e.Index}
	case e.Part != "" && e.Part != "inline":
		return rawElement{Part: e.Part}
	}
	r := rawElement{Value: num(e.Ohm), Tolerance: num(100*e.Tolerance) + "%", TCR: num(1e6*e.TCR) + "ppm/K"}
	opt := func(v float64, unit string) string {
		if v == 0 {
			return ""
		}
		return num(v) + unit
	}
	r.Power, r.MaxVoltage = opt(e.PowerW, "W"), opt(e.MaxVoltageV, "V")
	r.ThermalResistance = opt(e.ThermalResistance, "K/W")
	if e.LoadLife != 0 {
		r.LoadLife = num(100*e.LoadLife) + "%"
	}
	return r
}

func rawAmpOf(a *AmplifierChoice, d *Design) rawAmp {
	var r rawAmp
	if a.Gain != 0 {
		r.Gain = num(a.Gain)
	}
	if a.Part != "" {
		r.Part, r.Strapping = a.Part, a.Strapping
		return r
	}
	m := &a.Amp
	if m.Part == "" && !amplified(d.Family, d.Options) {
		return rawAmp{} // a passive stage (an unbuffered divider)
	}
	opt := func(v float64, unit string) string {
		if v == 0 {
			return ""
		}
		return num(v) + unit
	}
	// Figures in units that take SI prefixes are written in engineering
	// notation with every digit ("10 µV", "2 nA"), which catalog/units reads
	// back to the same value.
	si := func(v float64, unit string) string {
		if v == 0 {
			return ""
		}
		return units.FormatExact(v, unit)
	}
	if m.Type == catalog.MatchedAmp && !integrated(d.Family) {
		r.Type = string(catalog.MatchedAmp)
	}
	r.Vos, r.VosDrift, r.Ib, r.Ios = si(m.VosV, "V"), si(m.VosDriftVK, "V/K"), si(m.IbA, "A"), si(m.IosA, "A")
	r.Aol, r.CMRR, r.GBW = opt(m.AolVV, ""), opt(m.CMRRdB, "dB"), si(m.GBWHz, "Hz")
	r.Noise, r.CurNoise = si(m.NoiseVHz, "V/rtHz"), si(m.NoiseAHz, "A/rtHz")
	r.CMNeg, r.CMPos, r.SwingNeg, r.SwingPos = si(m.CMNegV, "V"), si(m.CMPosV, "V"), si(m.SwingNegV, "V"), si(m.SwingPosV, "V")
	r.SupplyMax, r.Internal = si(m.SupplyMaxV, "V"), opt(m.InternalOhm, "")
	r.InNeg, r.InPos = si(m.InNegV, "V"), si(m.InPosV, "V")
	if m.GainErrorMax != 0 {
		r.GainError = num(100*m.GainErrorMax) + "%"
	}
	if m.GainDriftPPM != 0 {
		r.GainDrift = num(m.GainDriftPPM) + "ppm/K"
	}
	return r
}
