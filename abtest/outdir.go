package abtest

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"renderchain/dsp/wavio"
	"renderchain/models"
)

// copyPlots copies the variant's PNG plots from dir into the set.
func copyPlots(dir string, c *Clip, tmp string) error {
	slug := Slug(c.Label)
	matches, err := filepath.Glob(filepath.Join(dir, slug+".*.png"))
	if err != nil {
		return err
	}
	sort.Strings(matches)
	stem := strings.TrimSuffix(c.File, ".wav")
	for _, src := range matches {
		title := strings.TrimSuffix(strings.TrimPrefix(filepath.Base(src), slug+"."), ".png")
		if title == "" || strings.ContainsAny(title, `/\`) {
			continue
		}
		name := stem + "." + Slug(title) + ".png"
		b, err := os.ReadFile(src)
		if err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(tmp, name), b, 0o644); err != nil {
			return err
		}
		c.Plots = append(c.Plots, Plot{Title: title, File: name})
	}
	return nil
}

// Slug turns a label into a file-name stem: lower-case ASCII letters and
// digits, other runs of characters replaced by one hyphen, at most 40
// characters; "clip" if nothing is left.
func Slug(label string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(label) {
		if (r >= 'a' && r <= 'z') || (r >= '0' && r <= '9') {
			if dash && b.Len() > 0 {
				b.WriteByte('-')
			}
			dash = false
			b.WriteRune(r)
			if b.Len() >= 40 {
				break
			}
			continue
		}
		dash = true
	}
	if b.Len() == 0 {
		return "clip"
	}
	return b.String()
}

// checkOutDir looks for an earlier set in dir. It returns the files of the
// earlier set that a new one replaces or retires (for commit), or an
// *ExistsError when there are clips there and force is off.
func checkOutDir(dir string, force bool, dry string) ([]string, error) {
	st, err := os.Stat(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	if !st.IsDir() {
		return nil, models.Fieldf("output", dir, "is a file, not a folder")
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var found []string
	for _, e := range entries {
		n := e.Name()
		if n == ManifestFile || n == PageFile || strings.EqualFold(filepath.Ext(n), ".wav") {
			if same, _ := wavio.SameFile(filepath.Join(dir, n), dry); same {
				continue
			}
			found = append(found, n)
		}
	}
	if len(found) == 0 {
		return nil, nil
	}
	if !force {
		sort.Strings(found)
		return nil, &ExistsError{Dir: dir, Files: found}
	}
	// The earlier set's own files: what its ab.json names, and the fixed names.
	stale := []string{ManifestFile, PageFile, SequenceFile}
	var old struct {
		Variants []struct {
			File  string `json:"file"`
			Plots []Plot `json:"plots"`
		} `json:"variants"`
		Pictures []Plot `json:"pictures"`
	}
	if b, err := os.ReadFile(filepath.Join(dir, ManifestFile)); err == nil && json.Unmarshal(b, &old) == nil {
		for _, v := range old.Variants {
			stale = append(stale, v.File)
			for _, p := range v.Plots {
				stale = append(stale, p.File)
			}
		}
		for _, p := range old.Pictures {
			stale = append(stale, p.File)
		}
	}
	var keep []string
	for _, s := range stale {
		if s == "" || s != filepath.Base(s) {
			continue // only plain names inside dir
		}
		if same, _ := wavio.SameFile(filepath.Join(dir, s), dry); same {
			continue
		}
		keep = append(keep, s)
	}
	return keep, nil
}

// checkKeyPath resolves the key file's path and checks it lies outside the
// set's folder.
func checkKeyPath(p, dir string, force bool) (string, error) {
	if p == "" {
		p = dir + "-key.json"
	}
	abs, err := filepath.Abs(p)
	if err != nil {
		return "", err
	}
	if rel, err := filepath.Rel(dir, abs); err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return "", paramErr("key", p, "a file outside the set's folder (the listener gets that folder)")
	}
	if st, err := os.Stat(abs); err == nil {
		if st.IsDir() {
			return "", models.Fieldf("key", p, "is a folder")
		}
		if !force {
			return "", &ExistsError{Dir: filepath.Dir(abs), Files: []string{filepath.Base(abs)}}
		}
	}
	return abs, nil
}
