package main

import (
	"os/exec"
	"strings"
	"testing"
)

// TestPureStagesDoNotImportOpenCV enforces DESIGN.md: kinematics and visits
// work on plain Go data and never reach gocv, directly or indirectly.
func TestPureStagesDoNotImportOpenCV(t *testing.T) {
	pkgs := []string{"flitlog/kinematics", "flitlog/visits", "flitlog/visits/agree",
		"flitlog/track/link", "flitlog/track/mot", "flitlog/cmd/flitlog/internal/plots"}
	for _, p := range pkgs {
		out, err := exec.Command("go", "list", "-deps", p).CombinedOutput()
		if err != nil {
			t.Fatalf("go list -deps %s: %v\n%s", p, err, out)
		}
		for _, dep := range strings.Fields(string(out)) {
			if strings.HasPrefix(dep, "gocv.io/") {
				t.Errorf("%s imports %s (through its dependencies); it must stay pure Go", p, dep)
			}
		}
	}
}
