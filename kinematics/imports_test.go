package kinematics

import (
	"os/exec"
	"strings"
	"testing"
)

// TestNoOpenCV enforces the design rule that kinematics never imports
// gocv, directly or indirectly (DESIGN.md), by listing its dependencies.
func TestNoOpenCV(t *testing.T) {
	out, err := exec.Command("go", "list", "-deps", ".").CombinedOutput()
	if err != nil {
		t.Fatalf("go list -deps: %v\n%s", err, out)
	}
	for _, dep := range strings.Fields(string(out)) {
		if strings.HasPrefix(dep, "gocv.io/") || dep == "flitlog/calibration" || strings.HasPrefix(dep, "flitlog/track") {
			t.Errorf("kinematics depends on %s", dep)
		}
	}
}
