package meadow

import (
	"os"
	"path/filepath"
	"reflect"
	"testing"
	"time"
)

func TestCachedClipRendersOnce(t *testing.T) {
	dir := t.TempDir()
	cfg := small(5)
	clip1, t1, err := CachedClip(cfg, dir, ".avi")
	if err != nil {
		t.Fatal(err)
	}
	st1, err := os.Stat(clip1)
	if err != nil {
		t.Fatal(err)
	}
	time.Sleep(20 * time.Millisecond)
	clip2, t2, err := CachedClip(cfg, dir, ".avi")
	if err != nil {
		t.Fatal(err)
	}
	st2, _ := os.Stat(clip2)
	if clip1 != clip2 || !st1.ModTime().Equal(st2.ModTime()) {
		t.Errorf("second call re-rendered: %s %v, then %s %v", clip1, st1.ModTime(), clip2, st2.ModTime())
	}
	if !reflect.DeepEqual(t1.Points, t2.Points) || !reflect.DeepEqual(t1.Flowers, t2.Flowers) {
		t.Error("cached truth differs from the first")
	}
	// Another seed is another entry.
	clip3, _, err := CachedClip(small(6), dir, ".avi")
	if err != nil {
		t.Fatal(err)
	}
	if clip3 == clip1 {
		t.Error("different configs share a cache entry")
	}
	// An incomplete entry (no marker) is rendered again.
	os.Remove(filepath.Join(filepath.Dir(clip1), "complete"))
	if _, _, err := CachedClip(cfg, dir, ".avi"); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(filepath.Dir(clip1), "complete")); err != nil {
		t.Error("incomplete entry was not completed")
	}
}
