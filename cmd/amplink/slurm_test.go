package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"amplink/core/demo"
)

// With AMPLINK_TEST_CLI=1 the test binary is the amplink command, so that
// the shell scripts under test can call "amplink" (TestSlurmScripts).
func init() {
	if os.Getenv("AMPLINK_TEST_CLI") != "1" {
		return
	}
	if err := run(os.Stdout, os.Stderr, os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "amplink:", err)
		os.Exit(1)
	}
	os.Exit(0)
}

// TestSlurmScripts runs the README's array-job example (docs/slurm) without
// Slurm: a stand-in sbatch records what submit.sh asks of it, the test runs
// each array task as Slurm would (SLURM_ARRAY_TASK_ID = 1…N) and then the
// merge job, and the merged table and group figures must equal, byte for
// byte, those of one amplink run --dataset --group-column over the same
// dataset. Four participants of the demo study, one of them without a
// group (n/a), which both routes leave out.
func TestSlurmScripts(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("the scripts are POSIX shell")
	}
	for _, tool := range []string{"sh", "awk", "find", "sed", "sort", "wc"} {
		if _, err := exec.LookPath(tool); err != nil {
			t.Skipf("no %s on PATH", tool)
		}
	}
	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	root := filepath.Join(dir, "study")
	keep := map[string]bool{"sub-01": true, "sub-02": true, "sub-03": true, "sub-04": true}
	_, err = demo.StudyFiles(func(f demo.StudyFile) error {
		if top, _, nested := strings.Cut(f.Path, "/"); nested && strings.HasPrefix(top, "sub-") && !keep[top] {
			return nil
		}
		data := f.Data
		if f.Path == "participants.tsv" {
			data = []byte("participant_id\tage\tgroup\nsub-01\t41\trested\nsub-02\t28\tsleepy\nsub-03\t20\trested\nsub-04\t31\tn/a\n")
		}
		p := filepath.Join(root, filepath.FromSlash(f.Path))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return err
		}
		return os.WriteFile(p, data, 0o644)
	})
	if err != nil {
		t.Fatal(err)
	}
	recipe := filepath.Join(root, "code", "recipe.json")

	bin := filepath.Join(dir, "bin")
	os.Mkdir(bin, 0o755)
	calls := filepath.Join(dir, "sbatch-calls")
	scripts := map[string]string{
		"amplink": "#!/bin/sh\nAMPLINK_TEST_CLI=1 exec '" + self + "' \"$@\"\n",
		// Records its arguments, one a line, and answers as --parsable does.
		"sbatch": "#!/bin/sh\nn=$(ls '" + calls + "' 2>/dev/null | wc -l)\nn=$((n + 1))\nmkdir -p '" + calls + "'\n" +
			"printf '%s\\n' \"$@\" >'" + calls + "'/$n\necho \"$((7000 + n));cluster\"\n",
	}
	for name, body := range scripts {
		if err := os.WriteFile(filepath.Join(bin, name), []byte(body), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	env := append(os.Environ(), "PATH="+bin+string(os.PathListSeparator)+os.Getenv("PATH"))
	sh := func(extra []string, args ...string) (string, error) {
		cmd := exec.Command("sh", args...)
		cmd.Env = append(append([]string(nil), env...), extra...)
		var b bytes.Buffer
		cmd.Stdout, cmd.Stderr = &b, &b
		err := cmd.Run()
		return b.String(), err
	}
	slurm, err := filepath.Abs(filepath.Join("..", "..", "docs", "slurm"))
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "tables")
	msg, err := sh(nil, filepath.Join(slurm, "submit.sh"), root, recipe, out, "group")
	if err != nil {
		t.Fatalf("submit.sh: %v\n%s", err, msg)
	}
	if want := "submitted 3 array tasks as job 7001 and the merge as job 7002\n"; msg != want {
		t.Errorf("submit.sh said %q, want %q", msg, want)
	}
	if b, _ := os.ReadFile(filepath.Join(out, "participants.txt")); string(b) != "01\n02\n03\n" {
		t.Errorf("participants.txt %q, want 01, 02, 03 (04 has no group)", b)
	}
	call := func(n int) []string {
		b, err := os.ReadFile(filepath.Join(calls, fmt.Sprint(n)))
		if err != nil {
			t.Fatal(err)
		}
		return strings.Split(strings.TrimSuffix(string(b), "\n"), "\n")
	}
	array, merge := call(1), call(2)
	wantArray := []string{"--parsable", "--array=1-3%50", "--output=" + out + "/logs/run-%A_%a.log", filepath.Join(slurm, "run-array.sh"), root, recipe, out}
	wantMerge := []string{"--parsable", "--dependency=afterany:7001", "--output=" + out + "/logs/merge-%j.log", filepath.Join(slurm, "merge.sh"), root, out, "group"}
	if strings.Join(array, " ") != strings.Join(wantArray, " ") || strings.Join(merge, " ") != strings.Join(wantMerge, " ") {
		t.Fatalf("sbatch was asked\n%q\n%q\nwant\n%q\n%q", array, merge, wantArray, wantMerge)
	}
	// Each task as Slurm runs it: the script after the options, with its
	// arguments, and the task's variables set.
	for task := 1; task <= 3; task++ {
		if msg, err := sh([]string{fmt.Sprintf("SLURM_ARRAY_TASK_ID=%d", task), "SLURM_CPUS_PER_TASK=2"}, array[3:]...); err != nil {
			t.Fatalf("task %d: %v\n%s", task, err, msg)
		}
	}
	if msg, err := sh([]string{"SLURM_ARRAY_TASK_ID=4"}, array[3:]...); err == nil || !strings.Contains(msg, "has no line 4") {
		t.Errorf("task 4 of 3: %v, %q", err, msg)
	}
	if msg, err := sh(nil, merge[3:]...); err != nil || !strings.Contains(msg, "3 recordings from 3 tables") {
		t.Fatalf("merge.sh: %v\n%s", err, msg)
	}

	one := filepath.Join(dir, "one")
	var stdout, stderr bytes.Buffer
	if err := run(&stdout, &stderr, []string{"run", "--recipe", recipe, "--out", one, "--dataset", root, "--group-column", "group"}); err != nil {
		t.Fatalf("run --dataset: %v\n%s", err, stderr.String())
	}
	want, err := os.ReadFile(filepath.Join(one, "results.csv"))
	if err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(filepath.Join(out, "group.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		os.WriteFile(filepath.Join(dir, "diff-hint"), got, 0o644)
		t.Errorf("the array job's table differs from run --dataset's:\n%s\nwant\n%s", got, want)
	}
	figs, _ := filepath.Glob(filepath.Join(one, "figures", "group_*.svg"))
	if len(figs) == 0 {
		t.Fatal("run --dataset drew no group figures")
	}
	for _, f := range figs {
		w, _ := os.ReadFile(f)
		g, err := os.ReadFile(filepath.Join(out, "group-figures", filepath.Base(f)))
		if err != nil || !bytes.Equal(g, w) {
			t.Errorf("group figure %s differs (%v)", filepath.Base(f), err)
		}
	}
}
