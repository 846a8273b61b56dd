// Command tapersweep opens the window by default; subcommands do the same work headless.
package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"tapersweep/analysis"
	// Before the window toolkit reads the user's language: quiet in the C.UTF-8 locale.
	_ "tapersweep/cmd/tapersweep/internal/plainlocale"
	"tapersweep/cmd/tapersweep/internal/quietlog"
)

func main() {
	quietLibraries()
	stopOnSignal(os.Stderr)
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// quietLibraries keeps the DICOM reader's own log lines, which repeat the error a command
// states, off stderr; the toolkit's lines still show.
func quietLibraries() { quietlog.Install(os.Stderr) }

// Exit codes shared by every subcommand.
const (
	exitOK       = 0
	exitBadInput = 1
	exitUsage    = 2
)

// run dispatches to a subcommand, or opens the window when the first word is not one.
func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 || strings.HasPrefix(args[0], "-") && args[0] != "-h" && args[0] != "--help" && args[0] != "-help" {
		return runWindow(args, stderr)
	}
	name := args[0]
	if name == "-h" || name == "--help" || name == "-help" || name == "help" {
		printOverview(stdout)
		return exitOK
	}
	for _, c := range commands() {
		if c.name == name {
			return c.run(args[1:], stdout, stderr)
		}
	}
	fmt.Fprintf(stderr, "tapersweep: unknown command %q\n\n", name)
	printOverview(stderr)
	return exitUsage
}

func printOverview(w io.Writer) {
	fmt.Fprintln(w, "tapersweep: how tapered files meet the wall of a root canal.")
	fmt.Fprintln(w, "\nUsage:\n  tapersweep [--canal PATH] [--sequence PATH]   open the window (the demo canal when no canal is given)")
	fmt.Fprintln(w, "  tapersweep COMMAND [flags]                      work headless")
	fmt.Fprintln(w, "\nCommands:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-11s %s\n", c.name, c.summary)
	}
	fmt.Fprintln(w, "\nRun 'tapersweep COMMAND --help' for the flags of one command.")
	fmt.Fprintln(w, "\n"+cautionText)
}

// cautionText is the safety wording every report and the About box carry.
var cautionText = analysis.Caution
