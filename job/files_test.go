package job

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/skyframe/skyframe/render"
)

// RemoveStaleTemps removes the temporary files of the names given (as
// render.WriteFileAtomic names them: render.TempPrefix and a random
// suffix), in every directory they are in, and nothing else: not the files
// themselves, not another frame's temporary files, not a name that merely
// contains theirs.
func TestRemoveStaleTemps(t *testing.T) {
	out := t.TempDir()
	files := map[string]bool{ // file → removed
		"frames/00001.png":  false,
		"frames/00001.json": false,
		"frames/" + render.TempPrefix("00001.png") + "123":  true,
		"frames/" + render.TempPrefix("00001.json") + "9-1": true,
		"frames/" + render.TempPrefix("00002.png") + "77":   false, // another frame's (another shard)
		"frames/.x00001.png.tmp-5":                          false,
		render.TempPrefix("00001.png") + "5":                false, // another directory
		"exr/" + render.TempPrefix("00001.exr") + "8":       true,
	}
	for name := range files {
		p := filepath.Join(out, name)
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := RemoveStaleTemps(out, "frames/00001.png", "", "frames/00001.json", "exr/00001.exr", "gone/00001.png"); err != nil {
		t.Fatal(err)
	}
	for name, removed := range files {
		_, err := os.Stat(filepath.Join(out, name))
		if gone := os.IsNotExist(err); gone != removed {
			t.Errorf("%s: removed %v, want %v", name, gone, removed)
		}
	}
}
