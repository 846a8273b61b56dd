package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"tapersweep/analysis"
	"tapersweep/models"
)

// command is one headless subcommand. Every command parses its flags the same way, prints
// help with an example on --help, and exits 0 (fine), 1 (bad input) or 2 (usage).
type command struct {
	name    string
	summary string
	usage   string // the synopsis after "tapersweep NAME"
	example string
	flags   func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int
}

func commands() []command {
	return []command{segmentCommand(), surfaceCommand(), centerlineCommand(), analyzeCommand(), renderCommand(), planCommand(), reportCommand(), batchCommand(), demoCommand()}
}

// filesHelp points every command's help to where the files a person writes are described.
const filesHelp = "The files you write (canal spec, sequence, instruments list): every field, unit, default and\n" +
	"allowed range, with an example of each, in the README, section \"Files you write\"."

// run parses args and calls the command's body.
func (c command) run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet(c.name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	body := c.flags(fs)
	help := func(w io.Writer) {
		fmt.Fprintf(w, "Usage: tapersweep %s %s\n\n%s\n\nFlags:\n", c.name, c.usage, c.summary)
		// The flag package prints "-name"; every usage line here writes "--name".
		var defaults strings.Builder
		fs.SetOutput(&defaults)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
		io.WriteString(w, strings.ReplaceAll("\n"+defaults.String(), "\n  -", "\n  --")[1:])
		fmt.Fprintf(w, "\nExample:\n  %s\n", c.example)
		fmt.Fprintf(w, "\n%s\n", filesHelp)
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			help(stdout)
			return exitOK
		}
		fmt.Fprintf(stderr, "tapersweep %s: %v\n\n", c.name, err)
		help(stderr)
		return exitUsage
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "tapersweep %s: unexpected argument %q\n\n", c.name, strings.Join(fs.Args(), " "))
		help(stderr)
		return exitUsage
	}
	out := &checkedWriter{w: stdout}
	code := body(out, stderr)
	if out.err != nil && code == exitOK {
		return outputFailed(stderr, c.name, out.err)
	}
	return code
}

// usageError reports a missing or wrong flag value.
func usageError(stderr io.Writer, cmd, format string, a ...any) int {
	fmt.Fprintf(stderr, "tapersweep %s: %s (see tapersweep %s --help)\n", cmd, fmt.Sprintf(format, a...), cmd)
	return exitUsage
}

// inputError reports bad input (a file that cannot be read or understood).
func inputError(stderr io.Writer, cmd string, err error) int {
	fmt.Fprintf(stderr, "tapersweep %s: %s\n", cmd, explain(err))
	return exitBadInput
}

// explain words an error for the command line. The library's messages name no options; the
// flags that get past an error are added here. Text from files is made printable.
func explain(err error) string {
	msg := err.Error()
	var units *analysis.UnitsError
	var specOpt *analysis.SpecOptionError
	switch {
	case errors.Is(err, analysis.ErrUntrustedSurface):
		msg += "; repair the surface, or run again with --force to measure it anyway"
	case errors.As(err, &units) && units.TooLarge():
		msg += ": if it is in micrometres, use --scale 0.001"
	case errors.As(err, &units):
		msg += ": if it is in metres, use --scale 1000; in centimetres, --scale 10"
	case errors.As(err, &specOpt):
		_, why, _ := strings.Cut(specOpt.Error(), "; ")
		msg = strings.Replace(msg, specOpt.Error(), "--"+specOpt.Option+" applies to STL surfaces; "+why, 1)
	}
	return models.Printable(msg, models.MaxMessageRunes)
}

// printWarnings puts every warning on standard error, whatever the output format, so a
// warning is never lost in a CSV or a picture.
func printWarnings(stderr io.Writer, cmd string, warnings []string) {
	for _, w := range warnings {
		fmt.Fprintf(stderr, "tapersweep %s: warning: %s\n", cmd, models.Printable(w, models.MaxMessageRunes))
	}
}
