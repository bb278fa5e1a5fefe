package scene

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/overlay"
)

// LoadNames reads the names table: path, or when path is empty the fetched
// copy in the user cache if it exists, or none for "none". A names file
// that does not read is a usage error (exit status 2) naming file and line.
func LoadNames(path string) (*names.Table, error) {
	switch path {
	case "none":
		return nil, nil
	case "":
		dir, err := catalog.CacheDir()
		if err != nil {
			return nil, nil
		}
		p := filepath.Join(dir, names.Published.File)
		if _, err := os.Stat(p); errors.Is(err, fs.ErrNotExist) {
			return nil, nil
		}
		path = p
	}
	t, err := names.ReadFile(path)
	if err != nil {
		return nil, &InputError{err}
	}
	return t, nil
}

// findStar resolves a star reference of option flag (e.g. "toward") with
// the index, wording a failure as a usage error that says what else the
// option takes.
func findStar(x *names.Index, flag, other, s string) (int, error) {
	i, err := x.Find(s)
	if err == nil {
		return i, nil
	}
	var le *names.LookupError
	if errors.As(err, &le) && le.Err == names.ErrUnknown && other != "" {
		return 0, usagef("--%s %v (or %s)", flag, err, other)
	}
	return 0, usagef("--%s %v", flag, err)
}

// splitLabel reads a --label value: STAR or STAR=TEXT (custom label text).
func splitLabel(v string) (star, text string) {
	star, text, _ = strings.Cut(v, "=")
	return strings.TrimSpace(star), strings.TrimSpace(text)
}

// NamesCredit is the attribution an output carries when it may show names
// from the IAU table (shown: it prints names at all): names.Credit, else "".
func NamesCredit(x *names.Index, shown bool) string {
	if x == nil || x.Table() == nil || !shown {
		return ""
	}
	return names.Credit
}

// LabelsShown reports whether label options draw any label.
func LabelsShown(l overlay.LabelOptions) bool { return l.Brightest > 0 || len(l.Stars) > 0 }
