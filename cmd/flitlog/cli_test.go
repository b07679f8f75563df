package main

import (
	"bytes"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func runMain(args ...string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = Main(args, &o, &e)
	return code, o.String(), e.String()
}

func TestUsageErrors(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want string // in the one-line error
	}{
		{"no command", nil, "Usage"},
		{"unknown command", []string{"frobnicate"}, `unknown command "frobnicate"`},
		{"unknown flag", []string{"run", "--frobnicate"}, "flag provided but not defined"},
		{"px-per-mm zero", []string{"run", "--px-per-mm", "0", "x.mp4"}, "--px-per-mm must be > 0"},
		{"px-per-mm negative", []string{"run", "--px-per-mm=-2", "x.mp4"}, "--px-per-mm must be > 0"},
		{"fps zero", []string{"run", "--fps", "0", "x.mp4"}, "--fps must be > 0"},
		{"fps not a number", []string{"run", "--fps", "fast", "x.mp4"}, "invalid value"},
		{"both scales", []string{"run", "--px-per-mm", "2", "--calibration", "c.json", "x.mp4"}, "not both"},
		{"no clips", []string{"run", "--px-per-mm", "2"}, "no clips given"},
		{"workers", []string{"run", "--workers", "0", "x.mp4"}, "--workers must be at least 1"},
		{"version args", []string{"version", "x"}, "takes no arguments"},
		{"help unknown", []string{"help", "frobnicate"}, "unknown command"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runMain(c.args...)
			if code != exitUsage {
				t.Errorf("exit status %d, want %d", code, exitUsage)
			}
			if !strings.Contains(stderr, c.want) {
				t.Errorf("stderr %q does not contain %q", stderr, c.want)
			}
			if c.args != nil && strings.Count(strings.TrimSpace(stderr), "\n") != 0 {
				t.Errorf("error is not one line: %q", stderr)
			}
		})
	}
}

func TestHelpForEveryCommand(t *testing.T) {
	for _, c := range commands() {
		if c.run == nil {
			continue
		}
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := runMain(c.name, "--help")
			if code != exitOK || stderr != "" {
				t.Fatalf("exit %d, stderr %q", code, stderr)
			}
			if !strings.Contains(stdout, "usage: flitlog "+c.name) {
				t.Errorf("help of %s does not start with its usage line:\n%s", c.name, stdout)
			}
			code2, stdout2, _ := runMain("help", c.name)
			if code2 != exitOK || stdout2 != stdout {
				t.Errorf("'flitlog help %s' differs from '%s --help'", c.name, c.name)
			}
		})
	}
}

func TestPrintConfigRoundTrip(t *testing.T) {
	code, stdout, stderr := runMain("run", "--print-config", "--fps", "120", "--px-per-mm", "3.5")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	got := DefaultSettings()
	if err := parseSettings("printed", []byte(stdout), &got); err != nil {
		t.Fatalf("printed settings do not parse back: %v\n%s", err, stdout)
	}
	want := DefaultSettings()
	want.Video.FPS, want.Calibration.PXPerMM = 120, 3.5
	if !reflect.DeepEqual(got, want) {
		t.Errorf("round trip changed the settings:\n got %+v\nwant %+v", got, want)
	}
	for _, unit := range []string{"px_per_mm", "fps"} {
		if !strings.Contains(stdout, unit) {
			t.Errorf("printed settings lack %q", unit)
		}
	}
}

func TestSettingsFileErrors(t *testing.T) {
	cases := []struct {
		name, text, want string
	}{
		{"syntax", "[video]\nfps = = 3\n", "line 2"},
		{"unknown key", "[video]\nframes_per_second = 30\n", "unknown setting video.frames_per_second"},
		{"wrong type", "[video]\nfps = \"fast\"\n", "settings file t.toml"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := DefaultSettings()
			err := parseSettings("t.toml", []byte(c.text), &s)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want one containing %q", err, c.want)
			}
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("error is not one line: %q", err)
			}
		})
	}
}

func FuzzParseSettings(f *testing.F) {
	var b bytes.Buffer
	s := DefaultSettings()
	s.WriteTOML(&b)
	f.Add(b.String())
	f.Add("[video]\nfps = 30\n[calibration]\npx_per_mm = 2.5\n")
	f.Add("[output]\noverlay = true\nplots = false\n")
	f.Add("")
	f.Add("[[video]]\n")
	f.Fuzz(func(t *testing.T, text string) {
		s := DefaultSettings()
		err := parseSettings("fuzz.toml", []byte(text), &s)
		if err != nil && strings.Contains(err.Error(), "\n") {
			t.Errorf("multi-line error: %q", err)
		}
		if err == nil {
			s.Validate()
			var out bytes.Buffer
			if werr := s.WriteTOML(&out); werr != nil {
				t.Errorf("accepted settings do not print: %v", werr)
			}
		}
	})
}

// TestStageSettingsCheckedUpFront: a stage setting out of range in a
// settings file stops the run before any clip, naming the setting.
func TestStageSettingsCheckedUpFront(t *testing.T) {
	dir := t.TempDir()
	cases := []struct{ name, text, want string }{
		{"kinematics", "[kinematics]\nsmooth_window_s = -1\n", "SmoothWindowS"},
		{"visits", "[visits]\nmin_landing_s = -1\n", "visits settings"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(dir, c.name+".toml")
			os.WriteFile(p, []byte(c.text), 0o644)
			code, _, stderr := runMain("run", "--config", p, filepath.Join(dir, "x.mp4"))
			if code != exitUsage || !strings.Contains(stderr, c.want) {
				t.Errorf("exit %d, stderr %q; want exit %d naming %q", code, stderr, exitUsage, c.want)
			}
		})
	}
}
