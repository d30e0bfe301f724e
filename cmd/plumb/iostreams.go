package main

import (
	"bytes"
	"io"
	"os"

	"github.com/mattn/go-isatty"
	"golang.org/x/term"
)

// IOStreams are the streams a command reads and writes, with what is known
// about them: whether stdout and stderr are terminals (detected once, when
// the streams are made) and whether colour may be used.
type IOStreams struct {
	In     io.Reader
	Out    io.Writer
	ErrOut io.Writer

	outTTY bool
	errTTY bool
	// noColor is set when the NO_COLOR environment variable is present
	// and non-empty (no-color.org convention, common practice).
	noColor bool
	// colorMode is auto, always or never, from the configuration.
	colorMode string
	// width is the terminal width tables are fitted to.
	width int
	// rawErr is stderr without the terminal guard (see guardTerminals).
	rawErr io.Writer
}

// maxTableWidth is the width tables are fitted to on a terminal; a
// narrower terminal (but not below minTerminalWidth) narrows them further.
const (
	maxTableWidth    = 100
	minTerminalWidth = 40
)

// SystemIO returns the process's standard streams.
func SystemIO() *IOStreams {
	v, set := os.LookupEnv("NO_COLOR")
	width := maxTableWidth
	if w, _, err := term.GetSize(int(os.Stdout.Fd())); err == nil && w >= minTerminalWidth && w < width {
		width = w
	}
	s := &IOStreams{
		In:        os.Stdin,
		Out:       os.Stdout,
		ErrOut:    os.Stderr,
		outTTY:    isTerminal(os.Stdout),
		errTTY:    isTerminal(os.Stderr),
		noColor:   set && v != "",
		colorMode: "auto",
		width:     width,
	}
	s.guardTerminals()
	return s
}

// guardTerminals routes whatever goes to a terminal through a
// terminalWriter, so that no text from a catalog or a file reaches it
// with its control or bidirectional characters; a pipe or a file gets the
// bytes as they are. The progress bar, which redraws its line with a
// carriage return, writes to the raw stderr.
func (s *IOStreams) guardTerminals() {
	s.rawErr = s.ErrOut
	if s.outTTY {
		s.Out = &terminalWriter{w: s.Out}
	}
	if s.errTTY {
		s.ErrOut = &terminalWriter{w: s.ErrOut}
	}
}

// progressOut is where progress bars are drawn: the raw stderr.
func (s *IOStreams) progressOut() io.Writer {
	if s.rawErr != nil {
		return s.rawErr
	}
	return s.ErrOut
}

func isTerminal(f *os.File) bool {
	return isatty.IsTerminal(f.Fd()) || isatty.IsCygwinTerminal(f.Fd())
}

// TestIO returns streams backed by buffers: stdin, stdout and stderr. They
// are not terminals unless SetTerminal is called.
func TestIO() (*IOStreams, *bytes.Buffer, *bytes.Buffer, *bytes.Buffer) {
	in, out, errOut := &bytes.Buffer{}, &bytes.Buffer{}, &bytes.Buffer{}
	return &IOStreams{In: in, Out: out, ErrOut: errOut, colorMode: "auto", width: maxTableWidth}, in, out, errOut
}

// SetTerminal marks stdout and stderr as terminals or not (for tests).
func (s *IOStreams) SetTerminal(out, err bool) { s.outTTY, s.errTTY = out, err }

// IsStdoutTTY tells whether stdout is a terminal.
func (s *IOStreams) IsStdoutTTY() bool { return s.outTTY }

// IsStderrTTY tells whether stderr is a terminal.
func (s *IOStreams) IsStderrTTY() bool { return s.errTTY }

// SetColorMode sets the colour mode: "auto" (colour on a terminal unless
// NO_COLOR is set), "always" or "never".
func (s *IOStreams) SetColorMode(mode string) { s.colorMode = mode }

// ColorEnabled tells whether stdout output may carry ANSI colour.
func (s *IOStreams) ColorEnabled() bool {
	switch s.colorMode {
	case "always":
		return true
	case "never":
		return false
	}
	return s.outTTY && !s.noColor
}

// ANSI SGR sequences (ECMA-48).
const (
	sgrReset  = "\x1b[0m"
	sgrBold   = "\x1b[1m"
	sgrRed    = "\x1b[31m"
	sgrGreen  = "\x1b[32m"
	sgrYellow = "\x1b[33m"
)

func (s *IOStreams) paint(sgr, text string) string {
	if !s.ColorEnabled() || text == "" {
		return text
	}
	return sgr + text + sgrReset
}

// Bold, Red, Green and Yellow colour text when colour is enabled.
func (s *IOStreams) Bold(t string) string   { return s.paint(sgrBold, t) }
func (s *IOStreams) Red(t string) string    { return s.paint(sgrRed, t) }
func (s *IOStreams) Green(t string) string  { return s.paint(sgrGreen, t) }
func (s *IOStreams) Yellow(t string) string { return s.paint(sgrYellow, t) }
