package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"plumb/catalog"
)

func TestImportExitStatus(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	const header = "Part Number,Manufacturer,Resistance,Tolerance,TCR,Power,Package,Price (EUR)\n"
	good := write("good.csv", header+"EX-1,Orrin Resistive,1k,0.1%,25ppm,0.1W,0603,0.10\nEX-2,Orrin Resistive,2k,0.1%,25ppm,0.1W,0603,0.10\n")
	mixed := write("mixed.csv", header+"EX-3,Orrin Resistive,1k,0.1%,25ppm,0.1W,0603,0.10\nEX-4,Orrin Resistive,4x99,0.1%,25ppm,0.1W,0603,0.10\n")
	none := write("none.csv", header+"EX-5,Orrin Resistive,4x99,0.1%,25ppm,0.1W,0603,0.10\nEX-6,Orrin Resistive,1k,0.1%,50000ppm,0.1W,0603,0.10\n")
	nocur := write("nocur.csv", strings.Replace(header, " (EUR)", "", 1)+"EX-7,Orrin Resistive,1k,0.1%,25ppm,0.1W,0603,0.10\n")
	tests := []struct {
		name   string
		args   string
		code   int
		out    []string // in stdout
		notOut []string
		errIn  []string // in stderr
		parts  int      // in the catalog afterwards
	}{
		{"every row imported", "import " + good, exitOK, []string{"imported 2 part(s)"}, nil, nil, 2},
		{"one row skipped", "import " + mixed, exitOK, []string{"1 row(s) skipped", "4x99"}, nil, nil, 1},
		{"strict: one row skipped writes nothing", "import --strict " + mixed, exitError, []string{"4x99"}, nil, []string{"--strict", "nothing was written"}, 0},
		{"no row importable", "import " + none, exitError, []string{"50000 ppm/K", "4x99"}, nil, []string{"nothing imported"}, 0},
		{"no row importable, dry run", "import --dry-run " + none, exitError, nil, nil, []string{"nothing imported"}, 0},
		{"allow unusual keeps the slip, flagged", "import --allow-unusual " + none, exitOK, []string{"kept because of --allow-unusual"}, nil, nil, 1},
		{"no currency anywhere: one line", "import " + nocur, exitError, nil, nil, []string{"--currency"}, 0},
		{"currency given", "import --currency eur " + nocur, exitOK, []string{"imported 1 part(s)"}, nil, nil, 1},
		{"quiet prints only the summary", "-q import " + mixed, exitOK, []string{"1 row(s) skipped"}, []string{"4x99", "Rows to look at"}, nil, 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			db := filepath.Join(t.TempDir(), "parts.db")
			st, err := catalog.Create(db, false)
			if err != nil {
				t.Fatal(err)
			}
			st.Close()
			f, _, _ := testFactory(t)
			f.Catalog = f.openConfigured
			out, errOut, code := runPlumb(t, f, "--catalog "+db+" "+tc.args)
			if code != tc.code {
				t.Fatalf("exit %d, want %d\nstdout:\n%s\nstderr:\n%s", code, tc.code, out, errOut)
			}
			for _, w := range tc.out {
				if !strings.Contains(out, w) {
					t.Errorf("stdout lacks %q:\n%s", w, out)
				}
			}
			for _, w := range tc.notOut {
				if strings.Contains(out, w) {
					t.Errorf("stdout has %q:\n%s", w, out)
				}
			}
			for _, w := range tc.errIn {
				if !strings.Contains(errOut, w) {
					t.Errorf("stderr lacks %q:\n%s", w, errOut)
				}
			}
			if n := strings.Count(strings.TrimSpace(errOut), "\n"); tc.name == "no currency anywhere: one line" && n != 0 {
				t.Errorf("the missing currency takes %d lines:\n%s", n+1, errOut)
			}
			st, err = catalog.Open(db)
			if err != nil {
				t.Fatal(err)
			}
			defer st.Close()
			snap, err := st.Snapshot(t.Context())
			if err != nil {
				t.Fatal(err)
			}
			if n := snap.Len(); n != tc.parts {
				t.Errorf("%d part(s) in the catalog, want %d", n, tc.parts)
			}
		})
	}
}
