package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"tapersweep/analysis"
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

// explain words an error for the command line, adding the flag that gets past it.
func explain(err error) string {
	if errors.Is(err, analysis.ErrUntrustedSurface) {
		return err.Error() + "; repair the surface, or run again with --force to measure it anyway"
	}
	return err.Error()
}

// printWarnings puts every warning on standard error, whatever the output format, so a
// warning is never lost in a CSV or a picture.
func printWarnings(stderr io.Writer, cmd string, warnings []string) {
	for _, w := range warnings {
		fmt.Fprintf(stderr, "tapersweep %s: warning: %s\n", cmd, w)
	}
}
