package budget

import (
	"errors"
	"fmt"
	"math"
	"reflect"
	"sort"
	"strconv"
	"strings"
)

// ErrNotFinite is returned when a figure of a budget (or of any result
// built from one) is infinite or not a number. A pass rests only on finite
// figures: such a design is refused, never printed with Inf or NaN.
var ErrNotFinite = errors.New("budget: a figure is not a finite number")

// CheckFinite walks the exported fields of v (structs, pointers, slices,
// arrays and maps, named by their JSON names) and returns an error wrapping
// ErrNotFinite that names the first float that is NaN or ±Inf, under the
// name what. It returns nil when every figure is finite.
func CheckFinite(what string, v any) error {
	path, x, ok := firstNonFinite(reflect.ValueOf(v), "")
	if ok {
		return nil
	}
	return fmt.Errorf("%w: %s: %s is %s; a part figure is too large for the model (check the catalog's tempco, load life and amplifier figures)",
		ErrNotFinite, what, strings.TrimPrefix(path, "."), strconv.FormatFloat(x, 'g', -1, 64))
}

// firstNonFinite returns the path and value of the first non-finite float
// in v; ok is true when there is none.
func firstNonFinite(v reflect.Value, path string) (string, float64, bool) {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if x := v.Float(); math.IsNaN(x) || math.IsInf(x, 0) {
			return path, x, false
		}
	case reflect.Pointer, reflect.Interface:
		if !v.IsNil() {
			return firstNonFinite(v.Elem(), path)
		}
	case reflect.Struct:
		t := v.Type()
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			if !f.IsExported() {
				continue
			}
			name := f.Name
			if tag, _, _ := strings.Cut(f.Tag.Get("json"), ","); tag == "-" {
				continue
			} else if tag != "" {
				name = tag
			}
			sub := path + "." + name
			if f.Anonymous {
				sub = path
			}
			if p, x, ok := firstNonFinite(v.Field(i), sub); !ok {
				return p, x, false
			}
		}
	case reflect.Slice, reflect.Array:
		for i := 0; i < v.Len(); i++ {
			if p, x, ok := firstNonFinite(v.Index(i), path+"["+strconv.Itoa(i)+"]"); !ok {
				return p, x, false
			}
		}
	case reflect.Map:
		keys := v.MapKeys()
		sort.Slice(keys, func(i, j int) bool { return fmt.Sprint(keys[i]) < fmt.Sprint(keys[j]) })
		for _, k := range keys {
			if p, x, ok := firstNonFinite(v.MapIndex(k), path+"["+fmt.Sprint(k)+"]"); !ok {
				return p, x, false
			}
		}
	}
	return path, 0, true
}
