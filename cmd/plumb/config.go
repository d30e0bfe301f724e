package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"github.com/spf13/viper"

	"plumb/catalog"
	"plumb/optimize/cost"
	"plumb/optimize/search"
)

// Configuration keys. Each can be set by a flag of the same name (where the
// command has one), by the environment variable PLUMB_<KEY>, by the config
// file, or left at its default, in that order of precedence.
const (
	keyCatalog = "catalog"
	keyFormat  = "format"
	keyTop     = "top"
	keyColor   = "color"
	// keyImportCurrency is the currency of imported prices that carry none
	// (plumb import --currency overrides it).
	keyImportCurrency = "import.currency"
	// keyCurrencyRates are the exchange rates a solve converts prices
	// with: entries "FROM TO RATE DATE" (a YAML list, or one text with
	// entries separated by ';').
	keyCurrencyRates = "currency.rates"
)

// configKeys lists the keys in the order `plumb config show` prints them.
var configKeys = []string{keyCatalog, keyFormat, keyTop, keyColor, keyImportCurrency, keyCurrencyRates}

// envPrefix is the prefix of plumb's environment variables.
const envPrefix = "PLUMB"

// configFileName is the file looked for in the user's config directory.
const configFileName = "plumb.yaml"

var defaults = map[string]string{
	keyCatalog:        "",
	keyFormat:         "table",
	keyTop:            "5",
	keyColor:          "auto",
	keyImportCurrency: "",
	keyCurrencyRates:  "",
}

var (
	formats    = []string{"table", "json", "csv"}
	colorModes = []string{"auto", "always", "never"}
)

// Settings is the effective configuration, typed, with where each value
// came from.
type Settings struct {
	// Catalog is the catalog database path; "" means the embedded demo
	// catalog.
	Catalog string
	// Format is the default output format: table, json or csv.
	Format string
	// Top is the default number of designs `plumb solve` shows.
	Top int
	// Color is auto, always or never.
	Color string
	// ImportCurrency is the ISO 4217 code of imported prices that carry
	// none; "" for none.
	ImportCurrency string
	// Rates are the exchange rates of currency.rates.
	Rates cost.Rates

	// File is the config file read, "" if none.
	File string
	// values and sources hold each key's effective text and origin.
	values  map[string]string
	sources map[string]string
}

// Source says where the value of key came from: "flag --catalog",
// "env PLUMB_CATALOG", "config file PATH" or "default".
func (s *Settings) Source(key string) string { return s.sources[key] }

// Value is the effective value of key as text.
func (s *Settings) Value(key string) string { return s.values[key] }

// defaultSettings are the settings with nothing configured.
func defaultSettings() *Settings {
	s := &Settings{values: map[string]string{}, sources: map[string]string{}}
	for _, k := range configKeys {
		s.values[k], s.sources[k] = defaults[k], "default"
	}
	err := s.validate()
	if err != nil {
		panic("plumb: defaults do not validate: " + err.Error())
	}
	return s
}

// configSource describes how the config file is chosen.
type configSource struct {
	// Explicit is the --config flag value ("" if not given).
	Explicit string
	// ConfigDir returns the user's config directory (os.UserConfigDir).
	ConfigDir func() (string, error)
}

// findConfigFile returns the config file to read: the --config flag, else
// PLUMB_CONFIG, else plumb.yaml in the user's config directory if it exists;
// "" when there is none.
func (c configSource) findConfigFile() (string, error) {
	if c.Explicit != "" {
		if _, err := os.Stat(c.Explicit); err != nil {
			return "", fmt.Errorf("config file %s (from --config): %w: check the path or drop --config", c.Explicit, err)
		}
		return c.Explicit, nil
	}
	if p, ok := os.LookupEnv(envPrefix + "_CONFIG"); ok && p != "" {
		if _, err := os.Stat(p); err != nil {
			return "", fmt.Errorf("config file %s (from env %s_CONFIG): %w: check the path or unset the variable", p, envPrefix, err)
		}
		return p, nil
	}
	dir, err := c.ConfigDir()
	if err != nil {
		return "", nil // no config directory: no config file
	}
	p := filepath.Join(dir, "plumb", configFileName)
	if _, err := os.Stat(p); errors.Is(err, fs.ErrNotExist) {
		return "", nil
	} else if err != nil {
		return "", fmt.Errorf("config file %s: %w", p, err)
	}
	return p, nil
}

// loadSettings reads the configuration with viper: the flags of the command
// being run (only those the user set), the environment, the config file and
// the defaults.
func loadSettings(src configSource, flags *pflag.FlagSet) (*Settings, error) {
	file, err := src.findConfigFile()
	if err != nil {
		return nil, err
	}
	v := viper.New()
	if file != "" {
		v.SetConfigFile(file)
		v.SetConfigType("yaml")
		if err := v.ReadInConfig(); err != nil {
			return nil, fmt.Errorf("config file %s: %w: fix the YAML or point --config elsewhere", file, err)
		}
		for _, k := range v.AllKeys() {
			if !slices.Contains(configKeys, k) {
				return nil, fmt.Errorf("config file %s: unknown key %q: the keys are %s", file, k, strings.Join(configKeys, ", "))
			}
		}
	}
	return resolveSettings(v, flags, file)
}

func resolveSettings(v *viper.Viper, flags *pflag.FlagSet, file string) (*Settings, error) {
	s := &Settings{File: file, values: map[string]string{}, sources: map[string]string{}}
	for _, k := range configKeys {
		env := envPrefix + "_" + strings.ToUpper(strings.ReplaceAll(k, ".", "_"))
		v.SetDefault(k, defaults[k])
		if err := v.BindEnv(k, env); err != nil {
			return nil, fmt.Errorf("binding %s: %w", env, err)
		}
		var fl *pflag.Flag
		if flags != nil {
			fl = flags.Lookup(k)
		}
		if fl != nil && fl.Changed {
			if err := v.BindPFlag(k, fl); err != nil {
				return nil, fmt.Errorf("binding flag --%s: %w", k, err)
			}
		}
		// Viper applies the precedence; the source is worked out in the
		// same order to tell the user where the value came from.
		envVal, _ := os.LookupEnv(env)
		switch {
		case fl != nil && fl.Changed:
			s.sources[k] = "flag --" + k
		case envVal != "":
			s.sources[k] = "env " + env
		case v.InConfig(k):
			s.sources[k] = "config file " + file
		default:
			s.sources[k] = "default"
		}
		s.values[k] = v.GetString(k)
		if list, ok := v.Get(k).([]any); ok {
			var entries []string
			for _, e := range list {
				entries = append(entries, fmt.Sprint(e))
			}
			s.values[k] = strings.Join(entries, "; ")
		}
	}
	if err := s.validate(); err != nil {
		return nil, err
	}
	return s, nil
}

// invalid reports a setting plumb cannot use; a bad flag value is a usage
// error.
func (s *Settings) invalid(key, format string, a ...any) error {
	msg := fmt.Sprintf("%s %q (from %s) ", key, s.values[key], s.sources[key]) + fmt.Sprintf(format, a...)
	if strings.HasPrefix(s.sources[key], "flag ") {
		return usagef("%s", msg)
	}
	return errors.New(msg)
}

// validate fills the typed fields and rejects values plumb cannot use,
// naming where the value came from.
func (s *Settings) validate() error {
	s.Catalog = s.values[keyCatalog]
	s.Format = strings.ToLower(s.values[keyFormat])
	if !slices.Contains(formats, s.Format) {
		return s.invalid(keyFormat, "is not one of %s", strings.Join(formats, ", "))
	}
	top, err := strconv.Atoi(strings.TrimSpace(s.values[keyTop]))
	if err != nil || top < 1 || top > search.MaxTop {
		return s.invalid(keyTop, "must be a whole number from 1 to %d", search.MaxTop)
	}
	s.Top = top
	s.ImportCurrency = strings.ToUpper(strings.TrimSpace(s.values[keyImportCurrency]))
	if s.ImportCurrency != "" && !catalog.IsCurrencyCode(s.ImportCurrency) {
		return s.invalid(keyImportCurrency, "is not a three-letter ISO 4217 code such as EUR")
	}
	rates, err := cost.ParseRates(s.values[keyCurrencyRates])
	if err != nil {
		return s.invalid(keyCurrencyRates, "%v", strings.TrimPrefix(err.Error(), "cost: "))
	}
	s.Rates = rates
	s.Color = strings.ToLower(s.values[keyColor])
	if !slices.Contains(colorModes, s.Color) {
		return s.invalid(keyColor, "is not one of %s", strings.Join(colorModes, ", "))
	}
	return nil
}
