package job

import (
	"crypto/sha256"
	"encoding/hex"
	"os"
	"path/filepath"
	"strings"
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
// remove each other's files in flight. Each directory is read once,
// however many names it holds (a show's frames directory holds thousands).
func RemoveStaleTemps(outDir string, names ...string) error {
	byDir := map[string]map[string]bool{} // directory → base names
	var dirs []string
	for _, name := range names {
		if name == "" {
			continue
		}
		dir, base := filepath.Split(filepath.Join(outDir, filepath.FromSlash(name)))
		if byDir[dir] == nil {
			byDir[dir] = map[string]bool{}
			dirs = append(dirs, dir)
		}
		byDir[dir][base] = true
	}
	for _, dir := range dirs {
		ents, err := os.ReadDir(dir)
		if os.IsNotExist(err) {
			continue
		}
		if err != nil {
			return err
		}
		for _, e := range ents {
			if !isTempOf(e.Name(), byDir[dir]) {
				continue
			}
			if err := os.Remove(filepath.Join(dir, e.Name())); err != nil && !os.IsNotExist(err) {
				return err
			}
		}
	}
	return nil
}

// isTempOf reports whether name starts with render.TempPrefix of one of
// bases (".<base>.tmp-").
func isTempOf(name string, bases map[string]bool) bool {
	const sep = ".tmp-"
	if !strings.HasPrefix(name, ".") {
		return false
	}
	for i := 1; i+len(sep) <= len(name); i++ {
		if name[i:i+len(sep)] == sep && bases[name[1:i]] {
			return true
		}
	}
	return false
}
