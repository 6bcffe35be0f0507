package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// allowEnv names folders, beside the notebook's own, that a session may read
// and write files in (a list like PATH); `nutate run` and `nutate kernel` read
// it, and so does a kernelspec's "env". A notebook cannot set it.
const allowEnv = "NUTATE_ALLOW_FILES"

// allowFlags collects repeated --allow-files DIR options.
type allowFlags []string

func (a *allowFlags) String() string { return strings.Join(*a, string(os.PathListSeparator)) }
func (a *allowFlags) Set(v string) error {
	if strings.TrimSpace(v) == "" {
		return fmt.Errorf("want a folder, got \"\"")
	}
	*a = append(*a, v)
	return nil
}

// allowedFolders are the folders of --allow-files and NUTATE_ALLOW_FILES, made
// absolute; each must be an existing folder.
func allowedFolders(flags allowFlags) ([]string, error) {
	dirs := append([]string(nil), flags...)
	for _, d := range filepath.SplitList(os.Getenv(allowEnv)) {
		if strings.TrimSpace(d) != "" {
			dirs = append(dirs, d)
		}
	}
	var out []string
	for _, d := range dirs {
		abs, err := filepath.Abs(d)
		if err != nil {
			return nil, fmt.Errorf("--allow-files %s: %v", d, err)
		}
		info, err := os.Stat(abs)
		if err != nil {
			return nil, fmt.Errorf("--allow-files %s: %v", d, err)
		}
		if !info.IsDir() {
			return nil, fmt.Errorf("--allow-files %s: not a folder", d)
		}
		out = append(out, abs)
	}
	return out, nil
}
