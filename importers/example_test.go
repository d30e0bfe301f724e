package importers_test

import (
	"context"
	"fmt"
	"log"
	"os"
	"time"

	"plumb/catalog"
	"plumb/importers"
)

func ExampleGuessMapping() {
	header := []string{"Mfr Part #", "Manufacturer", "Resistance (Ohms)", "Tol.", "Tempco", "Qty on hand", "Price @ 100"}
	m, err := importers.GuessMapping(header, "")
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("kind:", m.Kind)
	for _, g := range m.Guesses {
		fmt.Printf("%-12s <- %-18q %.2f %s\n", g.Field, g.Column, g.Confidence, g.How)
	}
	// Output:
	// kind: resistor
	// part         <- "Mfr Part #"       1.00 exact
	// maker        <- "Manufacturer"     1.00 exact
	// resistance   <- "Resistance (Ohms)" 1.00 exact, bare numbers in Ω
	// tolerance    <- "Tol."             1.00 exact
	// tcr          <- "Tempco"           1.00 exact
	// stock        <- "Qty on hand"      1.00 exact
	// price        <- "Price @ 100"      0.80 price break from 100
}

func ExampleImport() {
	st, err := catalog.OpenMemory()
	if err != nil {
		log.Fatal(err)
	}
	defer st.Close()
	rep, err := importers.Import(context.Background(), st, []string{"testdata/resistors_b.csv"},
		importers.Options{Source: "distributor B", Now: time.Date(2026, 11, 30, 0, 0, 0, 0, time.UTC)})
	if err != nil {
		log.Fatal(err)
	}
	s := rep.Summary
	fmt.Printf("rows %d, parts %d (series %d), added %d, skipped %d\n", s.Rows, s.Parts, s.Series, s.Added, s.Skipped)
	if err := rep.WriteCSV(os.Stdout); err != nil {
		log.Fatal(err)
	}
	// Output:
	// rows 17, parts 6 (series 1), added 6, skipped 0
	// file,line,column,part,severity,raw,reason
	// testdata/resistors_b.csv,,,,info,,"not given, stored as unknown: thermal resistance (17 rows), load life (17 rows), voltage rating (1 row); a solve takes each at its documented default (README, ""Unknown figures"") and lists it"
	// testdata/resistors_b.csv,2,,TFA0603B25,info,,"lines 2-13 grouped as series TFA0603B25: E12, 12 values from 1000 to 8200 ohm; stock per value runs from 1000 to 1407, the series keeps the least"
}
