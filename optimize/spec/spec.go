package spec

import (
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"strings"

	"go.yaml.in/yaml/v3"
)

// ErrInvalid is wrapped by every error about a spec or design file's content.
var ErrInvalid = errors.New("spec: invalid file")

// Families a spec may name.
const (
	Inverting    = "inverting"
	NonInverting = "noninverting"
	Difference   = "difference"
	Divider      = "divider"
	CurrentSense = "current-sense"
	LevelShift   = "level-shift"
	InAmp        = "inamp"
	// Matched is a stage built on an amplifier with matched resistors inside.
	Matched = "matched"
)

// KnownFamilies lists every family name in a stable order.
var KnownFamilies = []string{Inverting, NonInverting, Difference, Divider, CurrentSense, LevelShift, InAmp, Matched}

// Analysis methods.
const (
	WorstCase  = "worst-case"
	RSS        = "rss"
	MonteCarlo = "monte-carlo"
)

// Monte Carlo distributions.
const (
	Uniform = "uniform"
	Normal  = "normal"
)

// Range is a closed interval in SI units.
type Range struct {
	Min float64 `json:"min"`
	Max float64 `json:"max"`
}

// Span returns Max - Min.
func (r Range) Span() float64 { return r.Max - r.Min }

// Reference is the voltage a stage is referred or shifted to.
type Reference struct {
	V         float64 `json:"v"`
	Tolerance float64 `json:"tolerance"`   // fraction
	Drift     float64 `json:"drift_per_k"` // fraction per K
	SourceOhm float64 `json:"source_ohm"`  // output resistance of the reference
}

// Limits are the pass/fail limits of a spec. Zero means no limit.
type Limits struct {
	GainError      float64 `json:"gain_error"`           // max |error|, fraction
	CMRRdB         float64 `json:"cmrr_db"`              // min
	GainDrift      float64 `json:"gain_drift_per_k"`     // max, fraction per K
	OutputOffsetV  float64 `json:"output_offset_v"`      // max |offset| at the output
	OffsetDriftVK  float64 `json:"offset_drift_v_per_k"` // max, output referred
	NoiseRMSV      float64 `json:"noise_rms_v"`          // max, output referred, over the bandwidth
	NoiseDensity   float64 `json:"noise_v_per_rthz"`     // max, output referred
	BandwidthHz    float64 `json:"bandwidth_hz"`         // min closed-loop -3 dB
	InputImpedance float64 `json:"input_impedance_ohm"`  // min
}

// Analysis chooses the error-budget method.
type Analysis struct {
	Method       string `json:"method"`
	Trials       int    `json:"trials"`
	Seed         uint64 `json:"seed"`
	Distribution string `json:"distribution"`
	// Sigmas is how many standard deviations a tolerance stands for (3).
	Sigmas float64 `json:"sigmas"`
	// Yield is the fraction of Monte Carlo trials that must pass (0 = none asked).
	Yield float64 `json:"yield"`
}

// Calibration says which initial errors are trimmed once at the reference
// temperature.
type Calibration struct {
	Gain   bool `json:"gain"`
	Offset bool `json:"offset"`
}

// Build holds the figures the cost of a build depends on.
type Build struct {
	Quantity      int     `json:"quantity"`
	Attrition     float64 `json:"attrition"` // fraction
	PlacementCost float64 `json:"placement_cost"`
	LineItemCost  float64 `json:"line_item_cost"`
	Currency      string  `json:"currency"`
	// Stock is "exclude" (skip parts short of stock) or "flag".
	Stock string `json:"stock"`
}

// Spec is a signal-conditioning requirement in SI units.
type Spec struct {
	Name     string   `json:"name"`
	About    string   `json:"about"`
	Families []string `json:"families"`
	// Gain is the target transfer: V/V, or V/A for a current-sense stage.
	Gain float64 `json:"gain"`
	// Offset is the target output for zero input, V (level-shift).
	Offset float64 `json:"offset_v"`
	// Input is the signal range: differential or single-ended volts, or
	// amperes through the shunt of a current-sense stage.
	Input        Range `json:"input"`
	Differential bool  `json:"differential"`
	// CommonMode is the input common-mode range, V.
	CommonMode Range `json:"common_mode"`
	// Output is the wanted output range (level-shift), V.
	Output     Range       `json:"output"`
	Supply     Range       `json:"supply"` // Min is the negative rail, Max the positive
	Reference  *Reference  `json:"reference,omitempty"`
	SourceOhm  float64     `json:"source_ohm"`
	LoadOhm    float64     `json:"load_ohm"`  // 0 = unloaded
	LeakageA   float64     `json:"leakage_a"` // current drawn by the load, A
	Temp       Range       `json:"temperature_c"`
	TempRef    float64     `json:"temperature_ref_c"`
	Limits     Limits      `json:"limits"`
	Analysis   Analysis    `json:"analysis"`
	Calibrate  Calibration `json:"calibration"`
	Impedance  Range       `json:"impedance_ohm"`
	Build      Build       `json:"build"`
	Combos     []string    `json:"combos"` // "series", "parallel"
	Derating   float64     `json:"derating"`
	SourceFile string      `json:"-"`
}

// WorstExcursion is max(|Tmax-Tref|, |Tmin-Tref|), K (domain notes §3).
func (s *Spec) WorstExcursion() float64 {
	return math.Max(math.Abs(s.Temp.Max-s.TempRef), math.Abs(s.Temp.Min-s.TempRef))
}

// HasFamily reports whether the spec allows family f.
func (s *Spec) HasFamily(f string) bool { return slices.Contains(s.Families, f) }

// Load reads a spec file.
func Load(path string) (*Spec, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("spec %s: %w", path, err)
	}
	return Parse(data, path)
}

// problems collects every error found in one file.
type problems struct {
	kind, file string
	errs       []error
}

func (p *problems) add(field, format string, args ...any) {
	p.errs = append(p.errs, &FieldError{Kind: p.kind, File: p.file, Field: field, Msg: fmt.Sprintf(format, args...)})
}

// FieldError is one problem in a spec or design file. It matches ErrInvalid
// under errors.Is.
type FieldError struct {
	Kind  string // "spec" or "design"
	File  string
	Field string // path such as limits.cmrr or positions.R1.tolerance
	Msg   string
}

// Error returns "spec FILE: FIELD: MESSAGE".
func (e *FieldError) Error() string {
	if e.Field == "" {
		return fmt.Sprintf("%s %s: %s", e.Kind, e.File, e.Msg)
	}
	return fmt.Sprintf("%s %s: %s: %s", e.Kind, e.File, e.Field, e.Msg)
}

// Is reports true for ErrInvalid.
func (e *FieldError) Is(target error) bool { return target == ErrInvalid }

func (p *problems) err() error {
	if len(p.errs) == 0 {
		return nil
	}
	return errors.Join(p.errs...)
}

// decodeStrict unmarshals YAML refusing unknown fields.
func decodeStrict(data []byte, v any, kind, file string) error {
	dec := yaml.NewDecoder(strings.NewReader(string(data)))
	dec.KnownFields(true)
	if err := dec.Decode(v); err != nil {
		return &FieldError{Kind: kind, File: file, Msg: cleanYAMLError(err).Error()}
	}
	return nil
}

// cleanYAMLError rewrites the decoder's "field x not found in type spec.raw"
// into words a spec writer can act on.
func cleanYAMLError(err error) error {
	msg := err.Error()
	if strings.Contains(msg, "not found in type") {
		var lines []string
		for _, l := range strings.Split(msg, "\n") {
			l = strings.TrimSpace(l)
			if i := strings.Index(l, " not found in type"); i >= 0 {
				l = l[:i] + " is not a known field (check the spelling against the README of the examples)"
			}
			if l = strings.TrimPrefix(l, "yaml: unmarshal errors:"); l != "" {
				lines = append(lines, l)
			}
		}
		return errors.New(strings.Join(lines, "; "))
	}
	if err.Error() == "EOF" {
		return errors.New("file is empty")
	}
	return err
}
