package assume

// Limit names as every result reports them (budget.Limit* are these).
const (
	LimitGainError      = "gain error"
	LimitCMRR           = "CMRR"
	LimitGainDrift      = "gain drift"
	LimitOutputOffset   = "output offset"
	LimitOffsetDrift    = "offset drift"
	LimitNoiseRMS       = "noise RMS"
	LimitNoiseDensity   = "noise density"
	LimitBandwidth      = "bandwidth"
	LimitInputImpedance = "input impedance"
	LimitHeadroom       = "amplifier headroom"
	LimitPower          = "resistor power"
	LimitVoltage        = "resistor voltage"
)

// feeds lists, for each figure, the limits whose value depends on it.
var feeds = map[string][]string{
	"tcr_ppm":                    {LimitGainError, LimitGainDrift, LimitCMRR},
	"tcr_tracking_ppm":           {LimitGainError, LimitGainDrift, LimitCMRR},
	"load_life":                  {LimitGainError, LimitCMRR},
	"thermal_resistance_k_per_w": {LimitGainError, LimitGainDrift},
	"power_w":                    {LimitPower, LimitGainError, LimitGainDrift},
	"max_voltage_v":              {LimitVoltage},
	"cm_neg_v":                   {LimitHeadroom},
	"cm_pos_v":                   {LimitHeadroom},
	"swing_neg_v":                {LimitHeadroom},
	"swing_pos_v":                {LimitHeadroom},
	"in_neg_v":                   {LimitHeadroom},
	"in_pos_v":                   {LimitHeadroom},
	"vos_v":                      {LimitOutputOffset},
	"vos_drift_v_per_k":          {LimitOutputOffset, LimitOffsetDrift},
	"ib_a":                       {LimitOutputOffset, LimitOffsetDrift},
	"ios_a":                      {LimitOutputOffset, LimitOffsetDrift},
	"aol_v_per_v":                {LimitGainError, LimitGainDrift},
	"cmrr_db":                    {LimitCMRR, LimitOutputOffset},
	"gbw_hz":                     {LimitBandwidth, LimitNoiseRMS},
	"noise_v_per_rthz":           {LimitNoiseRMS, LimitNoiseDensity},
	"noise_a_per_rthz":           {LimitNoiseRMS, LimitNoiseDensity},
	"gain_error_max":             {LimitGainError},
	"gain_drift_ppm":             {LimitGainDrift},
	"internal_ohm":               {LimitInputImpedance, LimitNoiseRMS, LimitNoiseDensity, LimitOutputOffset},
}

// Feeds returns the limits whose value depends on the figure.
func Feeds(figure string) []string { return feeds[figure] }

// Touching returns the assumptions that feed the limit.
func Touching(as []Assumption, limit string) []Assumption {
	var out []Assumption
	for _, a := range as {
		for _, l := range feeds[a.Figure] {
			if l == limit {
				out = append(out, a)
				break
			}
		}
	}
	return out
}
