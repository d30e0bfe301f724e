package eseries

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"testing"
)

// TestE24Table checks E24 against the table of IEC 60063:2015 as quoted in
// the project's domain notes §6 (IEC 60063:2015, from memory).
func TestE24Table(t *testing.T) {
	want := []float64{ // IEC 60063:2015, from memory, as quoted in the domain notes
		1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
		3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1,
	}
	if got := E24.Mantissas(); !slices.Equal(got, want) {
		t.Errorf("E24 = %v, want %v", got, want)
	}
}

// round3 rounds x to three significant figures for 1 <= x < 10.
func round3(x float64) float64 { return math.Round(x*100) / 100 }

// TestFormulaSeries checks E48, E96 and E192 against 10^(i/n) rounded to
// three significant figures, with 9.20 in E192 (formula 9.19) the single
// exception (IEC 60063:2015, from memory, as quoted in the domain notes §6).
func TestFormulaSeries(t *testing.T) {
	tests := []struct {
		name       string
		s          *Series
		exceptions map[int]float64 // index -> value the standard has instead
	}{
		{"E48", E48, nil},
		{"E96", E96, nil},
		{"E192", E192, map[int]float64{185: 9.20}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m := tc.s.Mantissas()
			if len(m) != tc.s.N {
				t.Fatalf("%d values, want %d", len(m), tc.s.N)
			}
			for i := range tc.s.N {
				f := round3(math.Pow(10, float64(i)/float64(tc.s.N)))
				want := f
				if x, ok := tc.exceptions[i]; ok {
					if x == f {
						t.Errorf("exception at %d is not one: formula gives %v too", i, f)
					}
					want = x
				}
				if m[i] != want {
					t.Errorf("value %d = %v, want %v (formula %v)", i, m[i], want, f)
				}
			}
		})
	}
	// The exception itself, in figures: 10^(185/192) = 9.19..., the standard has 9.20.
	if f := round3(math.Pow(10, 185.0/192)); f != 9.19 {
		t.Errorf("formula at E192 index 185 = %v, want 9.19", f)
	}
}

// TestE24Deviations checks that E24 departs from 10^(i/24) rounded to two
// figures exactly at 2.7 3.0 3.3 3.6 3.9 4.3 4.7 8.2 (IEC 60063:2015, from
// memory, as quoted in the domain notes §6).
func TestE24Deviations(t *testing.T) {
	var got []float64
	for i, m := range E24.Mantissas() {
		f := math.Round(math.Pow(10, float64(i)/24)*10) / 10
		if f != m {
			got = append(got, m)
		}
	}
	want := []float64{2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2}
	if !slices.Equal(got, want) {
		t.Errorf("E24 deviates from the formula at %v, want %v", got, want)
	}
}

// TestNesting checks that each series is every second value of the next
// finer one, E3 ⊂ E6 ⊂ E12 ⊂ E24 and E48 ⊂ E96 ⊂ E192 (IEC 60063:2015, a
// fact of the standard, from memory).
func TestNesting(t *testing.T) {
	tests := []struct {
		name         string
		coarse, fine *Series
	}{
		{"E3 in E6", E3, E6},
		{"E6 in E12", E6, E12},
		{"E12 in E24", E12, E24},
		{"E48 in E96", E48, E96},
		{"E96 in E192", E96, E192},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, f := tc.coarse.Mantissas(), tc.fine.Mantissas()
			if len(f) != 2*len(c) {
				t.Fatalf("fine has %d values, coarse %d", len(f), len(c))
			}
			for i, v := range c {
				if f[2*i] != v {
					t.Errorf("coarse[%d] = %v, fine[%d] = %v", i, v, 2*i, f[2*i])
				}
				if !tc.fine.Contains(v * 1000) {
					t.Errorf("%v k not in %s", v, tc.fine.Name)
				}
			}
		})
	}
}

func TestAllAndByName(t *testing.T) {
	names := []string{"E3", "E6", "E12", "E24", "E48", "E96", "E192"}
	for i, s := range All() {
		if s.Name != names[i] || s.N != len(s.Mantissas()) {
			t.Errorf("All()[%d] = %s with N %d and %d values", i, s.Name, s.N, len(s.Mantissas()))
		}
	}
	tests := []struct {
		name, in string
		want     *Series
	}{
		{"upper", "E96", E96},
		{"lower", "e96", E96},
		{"spaces", " E12 ", E12},
		{"unknown", "E100", nil},
		{"empty", "", nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := ByName(tc.in)
			if tc.want == nil {
				if !errors.Is(err, ErrUnknown) {
					t.Fatalf("ByName(%q) err = %v, want ErrUnknown", tc.in, err)
				}
				want := fmt.Sprintf("eseries: unknown series %q: use one of E3, E6, E12, E24, E48, E96, E192", tc.in)
				if err.Error() != want {
					t.Errorf("message %q, want %q", err, want)
				}
				return
			}
			if err != nil || s != tc.want {
				t.Errorf("ByName(%q) = %v, %v", tc.in, s, err)
			}
		})
	}
}

func TestValues(t *testing.T) {
	tests := []struct {
		name     string
		s        *Series
		from, to float64
		want     []float64
	}{
		{"one value", E96, 4900, 5000, []float64{4990}},
		{"closed ends", E12, 1000, 1500, []float64{1000, 1200, 1500}},
		{"across a decade", E96, 9000, 11000, []float64{9090, 9310, 9530, 9760, 10000, 10200, 10500, 10700, 11000}},
		{"below one ohm", E24, 0.1, 0.13, []float64{0.1, 0.11, 0.12, 0.13}},
		{"E192 exception", E192, 9100, 9300, []float64{9200}},
		{"empty interval", E12, 1300, 1400, nil},
		{"reversed", E12, 2000, 1000, nil},
		{"not positive", E12, -10, 0, nil},
		{"from zero", E3, 0, 1.0e-19, []float64{1.0e-20, 2.2e-20, 4.7e-20, 1.0e-19}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.s.Values(tc.from, tc.to); !slices.Equal(got, tc.want) {
				t.Errorf("Values(%v, %v) = %v, want %v", tc.from, tc.to, got, tc.want)
			}
		})
	}
}

// TestValuesExactDecimal checks every value over 0.1 ohm .. 1e12 ohm is the
// float64 nearest the decimal (as strconv reads it), ascending, with N per
// decade.
func TestValuesExactDecimal(t *testing.T) {
	for _, s := range All() {
		vs := s.Values(0.1, 1e12)
		if want := 13*s.N + 1; len(vs) != want {
			t.Errorf("%s: %d values over 0.1..1e12, want %d", s.Name, len(vs), want)
		}
		for i, v := range vs {
			d := i / s.N
			m := s.m[i%s.N]
			want, err := strconv.ParseFloat(fmt.Sprintf("%de%d", m, d-3), 64)
			if err != nil || v != want {
				t.Fatalf("%s value %d = %v, want %v", s.Name, i, v, want)
			}
		}
	}
}

func TestNearestUpDown(t *testing.T) {
	tests := []struct {
		name              string
		s                 *Series
		v                 float64
		nearest, up, down float64
	}{
		{"exact value", E96, 4990, 4990, 5110, 4870},
		{"just below exact", E96, 4989.999, 4990, 4990, 4870},
		{"decade boundary up", E96, 9760, 9760, 10000, 9530},
		{"decade boundary down", E96, 10000, 10000, 10200, 9760},
		{"rounds up into next decade", E96, 9900, 10000, 10000, 9760},
		{"rounds down below decade", E96, 9800, 9760, 10000, 9760},
		{"below one", E24, 0.5, 0.51, 0.51, 0.47},
		{"one", E24, 1, 1, 1.1, 0.91},
		{"tiny", E12, 1.3e-9, 1.2e-9, 1.5e-9, 1.2e-9},
		{"large", E6, 5e11, 4.7e11, 6.8e11, 4.7e11},
		{"E192 exception", E192, 9.2e3, 9200, 9310, 9090},
		{"E3 gap below midpoint", E3, 3.2, 2.2, 4.7, 2.2}, // midpoint sqrt(2.2*4.7) = 3.2156
		{"E3 gap above midpoint", E3, 3.3, 4.7, 4.7, 2.2},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.s.Nearest(tc.v); got != tc.nearest {
				t.Errorf("Nearest(%v) = %v, want %v", tc.v, got, tc.nearest)
			}
			if got := tc.s.Up(tc.v); got != tc.up {
				t.Errorf("Up(%v) = %v, want %v", tc.v, got, tc.up)
			}
			if got := tc.s.Down(tc.v); got != tc.down {
				t.Errorf("Down(%v) = %v, want %v", tc.v, got, tc.down)
			}
		})
	}
}

func TestOutOfRange(t *testing.T) {
	for _, v := range []float64{0, -1, math.NaN(), math.Inf(1), math.Inf(-1), 1e-30, 1e30} {
		if got := E96.Nearest(v); !math.IsNaN(got) {
			t.Errorf("Nearest(%v) = %v, want NaN", v, got)
		}
		if got := E96.Up(v); !math.IsNaN(got) {
			t.Errorf("Up(%v) = %v, want NaN", v, got)
		}
		if got := E96.Down(v); !math.IsNaN(got) {
			t.Errorf("Down(%v) = %v, want NaN", v, got)
		}
		if E96.Contains(v) {
			t.Errorf("Contains(%v) = true", v)
		}
	}
	if got := E96.Down(1e-20); !math.IsNaN(got) {
		t.Errorf("Down(1e-20) = %v, want NaN (below the lowest decade)", got)
	}
}

// TestNearestBruteForce compares Nearest with a search over Values on
// seeded log-uniform random inputs: the result must be a series value with
// no other value closer in ratio.
func TestNearestBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for range 20000 {
		s := all[rng.IntN(len(all))]
		v := math.Pow(10, -1+13*rng.Float64())
		n := s.Nearest(v)
		if !s.Contains(n) {
			t.Fatalf("%s.Nearest(%v) = %v, not in the series", s.Name, v, n)
		}
		dn := math.Abs(math.Log(v / n))
		for _, c := range s.Values(v/20, v*20) {
			if d := math.Abs(math.Log(v / c)); d < dn-1e-12 {
				t.Fatalf("%s.Nearest(%v) = %v, but %v is closer", s.Name, v, n, c)
			}
		}
		up, down := s.Up(v), s.Down(v)
		if !(down < v && v < up) && n != v {
			t.Fatalf("%s: Down(%v)=%v Up=%v do not bracket", s.Name, v, down, up)
		}
		if n != up && n != down && n != v {
			t.Fatalf("%s: Nearest(%v)=%v is neither Up %v nor Down %v", s.Name, v, n, up, down)
		}
	}
}

// TestNearestTiesGoUp checks the tie rule at log midpoints that float64
// holds exactly (sqrt(a·b) squared equals a·b).
func TestNearestTiesGoUp(t *testing.T) {
	ties := 0
	for _, s := range all {
		vs := s.Values(1, 1e6)
		for i := 1; i < len(vs); i++ {
			a, b := vs[i-1], vs[i]
			m := math.Sqrt(a * b)
			if m*m != a*b {
				continue
			}
			ties++
			if got := s.Nearest(m); got != b {
				t.Errorf("%s.Nearest(%v) between %v and %v = %v, want %v (ties go up)", s.Name, m, a, b, got, b)
			}
		}
	}
	if ties == 0 {
		t.Fatal("no exact ties found; the test checks nothing")
	}
	t.Logf("%d exact ties checked", ties)
}

func TestContainsAndSmallest(t *testing.T) {
	tests := []struct {
		name string
		v    float64
		want string // "" for none
	}{
		{"E3 value", 4700, "E3"},
		{"E6 value", 1.5e6, "E6"},
		{"E12 value", 0.82, "E12"},
		{"E24 value", 3.0, "E24"},
		{"E48 value", 1.05e3, "E48"},
		{"E96 value", 4990, "E96"},
		{"E192 value", 4930, "E192"},
		{"E192 exception", 9.2e3, "E192"},
		{"computed in floating point", 0.1 * 3 * 10, "E24"}, // 3.0000000000000004
		{"not a series value", 5000, ""},
		{"2.7 is E12, not E192", 2700, "E12"},
		{"2.71 is E192", 2710, "E192"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s, ok := Smallest(tc.v)
			if tc.want == "" {
				if ok {
					t.Errorf("Smallest(%v) = %s, want none", tc.v, s.Name)
				}
				return
			}
			if !ok || s.Name != tc.want {
				t.Errorf("Smallest(%v) = %v, %v; want %s", tc.v, s, ok, tc.want)
			}
		})
	}
	if E96.Contains(4990 * (1 + 1e-8)) {
		t.Error("Contains accepts a value 1e-8 off")
	}
	if !E96.Contains(4990 * (1 + 1e-10)) {
		t.Error("Contains refuses a value 1e-10 off")
	}
}

func BenchmarkNearest(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	vs := make([]float64, 1024)
	for i := range vs {
		vs[i] = math.Pow(10, -1+13*rng.Float64())
	}
	b.ReportAllocs()
	var sink float64
	for i := 0; b.Loop(); i++ {
		sink += E96.Nearest(vs[i&1023])
	}
	_ = sink
}
