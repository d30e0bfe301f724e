//go:build tools

package main

import (
	_ "github.com/jmoiron/sqlx"
	_ "github.com/mattn/go-isatty"
	_ "github.com/schollz/progressbar/v3"
	_ "github.com/spf13/cobra"
	_ "github.com/spf13/viper"
	_ "go.yaml.in/yaml/v3"
	_ "gonum.org/v1/gonum/mat"
	_ "gonum.org/v1/plot"
	_ "modernc.org/sqlite"
)
