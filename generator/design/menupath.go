package design

import "path/filepath"

// MenuPath is the file Budget.Menu names, for reading: a relative menu
// path is relative to the folder of the design file (Dir), so a design
// and its menu move together and open from any working directory. With
// no Dir (a design never saved) it is relative to the working directory.
func (d *Design) MenuPath() string {
	m := d.Budget.Menu
	if m == "" || filepath.IsAbs(m) || d.Dir == "" {
		return m
	}
	return filepath.Join(d.Dir, m)
}

// MoveTo makes dir the design's folder: a relative menu path is written
// anew relative to dir so that it still names the same file (kept
// absolute when no relative path reaches it, as across drives).
func (d *Design) MoveTo(dir string) {
	if abs, err := filepath.Abs(dir); err == nil {
		dir = abs
	}
	if m := d.Budget.Menu; m != "" && !filepath.IsAbs(m) {
		file, err := filepath.Abs(d.MenuPath())
		if err == nil {
			if rel, err := filepath.Rel(dir, file); err == nil {
				file = filepath.ToSlash(rel)
			}
			d.Budget.Menu = file
		}
	}
	d.Dir = dir
}

// folderOf is the absolute folder of a design file's path.
func folderOf(path string) string {
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	return filepath.Dir(path)
}
