package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type manOptions struct {
	IO   *IOStreams
	Dir  string
	Root *cobra.Command
	Now  func() time.Time
	// Quiet suppresses the list of files written.
	Quiet bool
}

func newManCmd(f *Factory, runF func(*manOptions) error) *cobra.Command {
	opts := &manOptions{IO: f.IO, Now: f.Now}
	cmd := &cobra.Command{
		Use:   "man DIR",
		Short: "Write a manual page for every command into DIR",
		Long: `Write a manual page (section 1, roff) for plumb and each of its commands
into DIR, creating DIR if needed: plumb.1, plumb-catalog-list.1, ...
Read one with: man -l DIR/plumb.1`,
		Example: `  plumb man ./man1`,
		Args:    exactArgs("DIR"),
		RunE: func(cmd *cobra.Command, args []string) error {
			opts.Dir = args[0]
			opts.Root = cmd.Root()
			opts.Quiet = f.Quiet
			if runF != nil {
				return runF(opts)
			}
			return runMan(opts)
		},
	}
	return cmd
}

func runMan(opts *manOptions) error {
	if err := os.MkdirAll(opts.Dir, 0o755); err != nil {
		return fmt.Errorf("creating manual directory: %w", err)
	}
	date := opts.Now().UTC().Format("2006-01-02")
	var walk func(c *cobra.Command) error
	walk = func(c *cobra.Command) error {
		if !c.IsAvailableCommand() && c.HasParent() {
			return nil
		}
		name := strings.ReplaceAll(c.CommandPath(), " ", "-") + ".1"
		path := filepath.Join(opts.Dir, name)
		page := manPage(c, date)
		if err := writeFileAtomic(path, true, func(w io.Writer) error { _, err := io.WriteString(w, page); return err }); err != nil {
			return fmt.Errorf("writing manual page: %w", err)
		}
		if !opts.Quiet {
			fmt.Fprintln(opts.IO.ErrOut, "wrote", path)
		}
		for _, sub := range c.Commands() {
			if err := walk(sub); err != nil {
				return err
			}
		}
		return nil
	}
	return walk(opts.Root)
}

// manPage renders one command as a man(7) page.
func manPage(c *cobra.Command, date string) string {
	var b strings.Builder
	dashed := strings.ReplaceAll(c.CommandPath(), " ", "-")
	fmt.Fprintf(&b, ".TH %q 1 %q \"plumb\" \"plumb manual\"\n", strings.ToUpper(dashed), date)
	b.WriteString(".SH NAME\n")
	fmt.Fprintf(&b, "%s \\- %s\n", roffEscape(dashed), roffEscape(c.Short))
	b.WriteString(".SH SYNOPSIS\n")
	fmt.Fprintf(&b, ".B %s\n", roffEscape(c.UseLine()))
	b.WriteString(".SH DESCRIPTION\n")
	long := c.Long
	if long == "" {
		long = c.Short
	}
	writeRoffText(&b, long)
	writeRoffFlags(&b, "OPTIONS", c.NonInheritedFlags())
	writeRoffFlags(&b, "OPTIONS INHERITED FROM PARENT COMMANDS", c.InheritedFlags())
	if c.Example != "" {
		b.WriteString(".SH EXAMPLE\n.nf\n")
		for _, line := range strings.Split(c.Example, "\n") {
			b.WriteString(roffLine(line) + "\n")
		}
		b.WriteString(".fi\n")
	}
	var see []string
	if c.HasParent() {
		see = append(see, strings.ReplaceAll(c.Parent().CommandPath(), " ", "-"))
	}
	for _, sub := range c.Commands() {
		if sub.IsAvailableCommand() {
			see = append(see, strings.ReplaceAll(sub.CommandPath(), " ", "-"))
		}
	}
	sort.Strings(see)
	if len(see) > 0 {
		b.WriteString(".SH SEE ALSO\n")
		for i, s := range see {
			sep := ","
			if i == len(see)-1 {
				sep = ""
			}
			fmt.Fprintf(&b, ".BR %s (1)%s\n", roffEscape(s), sep)
		}
	}
	return b.String()
}

func writeRoffFlags(b *strings.Builder, title string, fs *pflag.FlagSet) {
	if !fs.HasAvailableFlags() {
		return
	}
	fmt.Fprintf(b, ".SH %s\n", title)
	fs.VisitAll(func(fl *pflag.Flag) {
		if fl.Hidden {
			return
		}
		varname, usage := pflag.UnquoteUsage(fl)
		b.WriteString(".TP\n")
		head := ""
		if fl.Shorthand != "" {
			head = "\\fB\\-" + fl.Shorthand + "\\fP, "
		}
		head += "\\fB\\-\\-" + roffEscape(fl.Name) + "\\fP"
		if varname != "" {
			head += " \\fI" + roffEscape(varname) + "\\fP"
		}
		b.WriteString(head + "\n")
		if fl.DefValue != "" && fl.DefValue != "false" && fl.DefValue != "[]" && fl.DefValue != "0" {
			usage += " (default " + fl.DefValue + ")"
		}
		b.WriteString(roffLine(usage) + "\n")
	})
}

// writeRoffText writes paragraphs (blank-line separated) and keeps indented
// lines as they are.
func writeRoffText(b *strings.Builder, text string) {
	for _, para := range strings.Split(strings.TrimSpace(text), "\n\n") {
		b.WriteString(".PP\n")
		lines := strings.Split(para, "\n")
		literal := false
		for _, l := range lines {
			if strings.HasPrefix(l, "  ") {
				literal = true
			}
		}
		if literal {
			b.WriteString(".nf\n")
		}
		for _, l := range lines {
			b.WriteString(roffLine(l) + "\n")
		}
		if literal {
			b.WriteString(".fi\n")
		}
	}
}

// roffEscape escapes backslashes and hyphens for roff (groff_man(7)).
func roffEscape(s string) string {
	s = strings.ReplaceAll(s, `\`, `\e`)
	return strings.ReplaceAll(s, "-", `\-`)
}

// roffLine escapes a line of running text; a line starting with a dot or
// an apostrophe would be read as a request, so it gets a zero-width \&.
func roffLine(s string) string {
	s = roffEscape(s)
	if strings.HasPrefix(s, ".") || strings.HasPrefix(s, "'") {
		s = `\&` + s
	}
	return s
}
