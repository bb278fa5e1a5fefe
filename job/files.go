package job

import (
	"crypto/sha256"
	"encoding/hex"
	"os"
	"path/filepath"
	"strings"

	"github.com/skyframe/skyframe/render"
)

// SHA256 returns the lower-case hex SHA-256 of b.
func SHA256(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// RemoveStaleTemps deletes temporary files that an interrupted writer of
// the files names (relative to outDir, slash-separated; empty ones are
// skipped) left behind: names starting with render.TempPrefix of one of
// them. Only these names are touched, so shards sharing a directory never
// remove each other's files in flight.
func RemoveStaleTemps(outDir string, names ...string) error {
	for _, name := range names {
		if name == "" {
			continue
		}
		p := filepath.Join(outDir, filepath.FromSlash(name))
		dir := filepath.Dir(p)
		ents, err := os.ReadDir(dir)
		if os.IsNotExist(err) {
			continue
		}
		if err != nil {
			return err
		}
		prefix := render.TempPrefix(p)
		for _, e := range ents {
			if !strings.HasPrefix(e.Name(), prefix) {
				continue
			}
			if err := os.Remove(filepath.Join(dir, e.Name())); err != nil && !os.IsNotExist(err) {
				return err
			}
		}
	}
	return nil
}
