package main

import (
	"fmt"
	"io"
	"runtime/debug"
	"strings"

	"gocv.io/x/gocv"
)

// Version is the tool version written into every summary.json. Release
// builds set it with -ldflags "-X main.Version=..."; otherwise the module's
// build information (VCS revision) is used.
var Version = "0.1.0-dev"

// Exit statuses (DESIGN.md): 0 all clips ok, 1 some clip failed or partial,
// 2 usage error.
const (
	exitOK    = 0
	exitSome  = 1
	exitUsage = 2
)

type command struct {
	name    string
	summary string
	run     func(args []string, stdout, stderr io.Writer) int
}

func commands() []command {
	return []command{
		{"run", "score clips and folders of clips: tracks, landings, flights, plots", cmdRun},
		{"demo", "render the built-in demo scene, score it, compare with the truth", cmdDemo},
		{"flowers", "propose a flower map from a clip's background by blossom colour", cmdFlowers},
		{"calibrate", "make a calibration file (scale bar, plane points, chessboard)", cmdCalibrate},
		{"agree", "agreement between two landing tables (flitlog or hand-scored)", cmdAgree},
		{"version", "print the version of flitlog and of OpenCV", cmdVersion},
		{"help", "show help for a command", nil},
	}
}

// Main runs the command line args and returns the exit status.
func Main(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		usage(stderr)
		return exitUsage
	}
	name := args[0]
	switch name {
	case "-h", "--help", "-help":
		usage(stdout)
		return exitOK
	case "help":
		if len(args) == 1 {
			usage(stdout)
			return exitOK
		}
		for _, c := range commands() {
			if c.name == args[1] && c.run != nil {
				return c.run([]string{"--help"}, stdout, stderr)
			}
		}
		fmt.Fprintf(stderr, "flitlog help: unknown command %q; run 'flitlog help' for the list\n", args[1])
		return exitUsage
	case "-version", "--version":
		return cmdVersion(nil, stdout, stderr)
	}
	for _, c := range commands() {
		if c.name == name && c.run != nil {
			return c.run(args[1:], stdout, stderr)
		}
	}
	fmt.Fprintf(stderr, "flitlog: unknown command %q; run 'flitlog help' for the list\n", name)
	return exitUsage
}

func usage(w io.Writer) {
	fmt.Fprintf(w, "flitlog scores field video of foraging bees: landings on flowers, handling\n")
	fmt.Fprintf(w, "times, flights between flowers, flight speed and path shape.\n\n")
	fmt.Fprintf(w, "Usage:\n  flitlog <command> [flags] [arguments]\n\nCommands:\n")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-10s %s\n", c.name, c.summary)
	}
	fmt.Fprintf(w, "\nRun 'flitlog <command> --help' for a command's flags.\n")
	fmt.Fprintf(w, "First time? 'flitlog demo' shows the whole job on a made-up garden clip.\n")
}

// toolVersion returns Version with the VCS revision when the binary has one.
func toolVersion() string {
	v := Version
	if bi, ok := debug.ReadBuildInfo(); ok {
		var rev, dirty string
		for _, s := range bi.Settings {
			switch s.Key {
			case "vcs.revision":
				rev = s.Value
			case "vcs.modified":
				if s.Value == "true" {
					dirty = "+dirty"
				}
			}
		}
		if len(rev) > 12 {
			rev = rev[:12]
		}
		if rev != "" {
			v += " (" + rev + dirty + ")"
		}
	}
	return v
}

func cmdVersion(args []string, stdout, stderr io.Writer) int {
	if len(args) > 0 {
		if args[0] == "-h" || args[0] == "--help" || args[0] == "-help" {
			fmt.Fprintln(stdout, "usage: flitlog version\n\nPrints the versions of flitlog, gocv and OpenCV.")
			return exitOK
		}
		fmt.Fprintf(stderr, "flitlog version: takes no arguments (got %s)\n", strings.Join(args, " "))
		return exitUsage
	}
	fmt.Fprintf(stdout, "flitlog %s\ngocv %s, OpenCV %s\n", toolVersion(), gocv.Version(), gocv.OpenCVVersion())
	return exitOK
}
