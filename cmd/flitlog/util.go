package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/BurntSushi/toml"
)

func asParseError(err error, pe *toml.ParseError) bool {
	return errors.As(err, pe)
}

// errText turns common file-system errors into plain words.
func errText(err error) string {
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return "no such file: check the path"
	case errors.Is(err, fs.ErrPermission):
		return "permission denied: check the file's permissions"
	}
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

// writeFileAtomic writes a file through a temporary name in the same
// folder and renames it into place, so that an interrupted run never
// leaves a half-written file under the final name.
func writeFileAtomic(path string, write func(w io.Writer) error) error {
	dir := filepath.Dir(path)
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	ok := false
	defer func() {
		if !ok {
			f.Close()
			os.Remove(tmp)
		}
	}()
	if err := write(f); err != nil {
		return err
	}
	if err := f.Sync(); err != nil {
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	if err := os.Chmod(tmp, 0o644); err != nil {
		return err
	}
	if err := os.Rename(tmp, path); err != nil {
		return err
	}
	ok = true
	return nil
}

// parseInterspersed parses flags that may stand before, between or after
// positional arguments ('flitlog run clips/ --out results').
func parseInterspersed(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if rest[0] == "--" {
			return append(pos, rest[1:]...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// newFlagSet returns a flag set that stays silent on errors; parseArgs
// reports them as one line.
func newFlagSet(name string) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	return fs
}

// parseArgs parses interspersed flags and positional arguments. On --help
// it prints usageText and the flags to stdout; on a bad flag, one line to
// stderr. done is true when the caller should return code.
func parseArgs(fs *flag.FlagSet, args []string, usageText string, stdout, stderr io.Writer) (pos []string, code int, done bool) {
	pos, err := parseInterspersed(fs, args)
	if err == nil {
		return pos, 0, false
	}
	if errors.Is(err, flag.ErrHelp) {
		fmt.Fprint(stdout, strings.TrimLeft(usageText, "\n"))
		fmt.Fprintln(stdout, "\nFlags:")
		fs.SetOutput(stdout)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
		return nil, exitOK, true
	}
	fmt.Fprintf(stderr, "flitlog %s: %s; run 'flitlog %s --help'\n", fs.Name(), oneLine(err.Error()), fs.Name())
	return nil, exitUsage, true
}
