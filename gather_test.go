package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestGather: the outputs of a two-job "array" (--set tbw=4, --set tbw=8)
// gathered into one table: a column for the --set name, one row per point and
// quantity of each sweep (a profile of 5 offsets × 2 quantities, a 3 × 2 map),
// the axes' values as swept, and the jobs' values different where tbw matters.
func TestGather(t *testing.T) {
	dir := t.TempDir()
	src := writeNotebook(t, dir,
		"let tbw = 4\npulse p = sinc(duration = 2 ms, tbw = tbw, flip = 90 deg)",
		"sweep p over offset -1 kHz to 1 kHz points 5 show mz, mxy",
		"sweep p over offset -1 kHz to 1 kHz points 3, b1 0.9 to 1.1 points 2 show mz",
	)
	var outs []string
	for _, v := range []string{"4", "8"} {
		out := filepath.Join(dir, "job-tbw"+v+".ipynb")
		var log bytes.Buffer
		r := runner{sets: []string{"tbw=" + v}, stdout: &log, stderr: &log}
		if err := r.notebook(context.Background(), src, out); err != nil {
			t.Fatalf("job tbw=%s: %v\n%s", v, err, log.String())
		}
		outs = append(outs, out)
	}
	var table bytes.Buffer
	if err := gather(outs, &table); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&table).ReadAll()
	if err != nil {
		t.Fatalf("not CSV: %v", err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for _, h := range []string{"notebook", "tbw", "sweep", "pulse", "quantity", "x", "x unit", "x value", "y", "y value", "value"} {
		if _, ok := col[h]; !ok {
			t.Fatalf("header %v: no column %q", rows[0], h)
		}
	}
	const perJob = 5*2 + 3*2
	if got := len(rows) - 1; got != 2*perJob {
		t.Fatalf("got %d rows, want %d (2 jobs × (5 offsets × 2 quantities + 3 × 2 map points))", got, 2*perJob)
	}
	mzAt := map[string]map[string]string{} // tbw → x value → mz of the profile
	for _, r := range rows[1:] {
		tbw := r[col["tbw"]]
		if tbw != "4" && tbw != "8" {
			t.Fatalf("row %v: tbw %q", r, tbw)
		}
		if !strings.HasSuffix(r[col["notebook"]], "job-tbw"+tbw+".ipynb") {
			t.Errorf("row %v: notebook does not match its setting", r)
		}
		if _, err := strconv.ParseFloat(r[col["value"]], 64); err != nil {
			t.Errorf("row %v: value not a number", r)
		}
		if r[col["y"]] == "" && r[col["quantity"]] == "mz" {
			if mzAt[tbw] == nil {
				mzAt[tbw] = map[string]string{}
			}
			mzAt[tbw][r[col["x value"]]] = r[col["value"]]
		}
		if r[col["y"]] != "" && (r[col["y"]] != "b1" || r[col["x"]] != "offset") {
			t.Errorf("map row %v: axes %q, %q, want offset, b1", r, r[col["x"]], r[col["y"]])
		}
	}
	if len(mzAt["4"]) != 5 || mzAt["4"]["-1"] == "" || mzAt["4"]["1"] == "" {
		t.Fatalf("profile x values (kHz) for tbw=4: got %v, want -1 … 1 in 5 points", mzAt["4"])
	}
	// At the band edge (±1 kHz) a sinc of TBW 8 over 2 ms (bandwidth 4 kHz) is
	// still in its pass band, one of TBW 4 (2 kHz) at its half-height edge.
	if mzAt["4"]["1"] == mzAt["8"]["1"] {
		t.Errorf("mz at 1 kHz equal for tbw 4 and 8 (%s): the settings did not reach the jobs", mzAt["4"]["1"])
	}

	// A notebook never run has nothing to gather: say so.
	if err := gather([]string{src}, &bytes.Buffer{}); err == nil || !strings.Contains(err.Error(), "no sweep outputs") {
		t.Errorf("unrun notebook: got %v, want a no-sweep-outputs error", err)
	}
	if _, err := os.Stat(src); err != nil {
		t.Fatal(err)
	}
}

// testSlurmArrayExample runs the README's job-array example the way Slurm
// would, task by task (SLURM_ARRAY_TASK_ID set, `nutate` on the PATH, from a
// directory holding notebooks/ and results/), then its gathering job.
func testSlurmArrayExample(t *testing.T, bin string) {
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("no bash")
	}
	root, err := filepath.Abs(".")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	binDir := filepath.Join(dir, "bin")
	for _, d := range []string{binDir, filepath.Join(dir, "results")} {
		if err := os.MkdirAll(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Symlink(bin, filepath.Join(binDir, "nutate")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(filepath.Join(root, "notebooks"), filepath.Join(dir, "notebooks")); err != nil {
		t.Fatal(err)
	}
	env := append(os.Environ(), "PATH="+binDir+string(os.PathListSeparator)+os.Getenv("PATH"))
	for _, task := range []string{"0", "4"} {
		cmd := exec.Command(bash, filepath.Join(root, "notebooks", "p31_bmax_array.sh"))
		cmd.Dir = dir
		cmd.Env = append(env, "SLURM_ARRAY_TASK_ID="+task)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("array task %s: %v\n%s", task, err, out)
		}
	}
	cmd := exec.Command(bash, "-c", "nutate run --gather results/p31-bmax-*.ipynb > results/p31-bmax.csv")
	cmd.Dir = dir
	cmd.Env = env
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("gather job: %v\n%s", err, out)
	}
	f, err := os.Open(filepath.Join(dir, "results", "p31-bmax.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, r := range rows[1:] {
		seen[r[1]] = true
	}
	if rows[0][1] != "bmax" || len(seen) != 2 || !seen["15 uT"] || !seen["35 uT"] {
		t.Fatalf("gathered table: header %v, bmax values %v; want a bmax column with 15 uT and 35 uT", rows[0], seen)
	}
}
