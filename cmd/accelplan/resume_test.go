package main

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestMain lets the test binary stand in for the command, so a test can run
// it as a separate process and kill it.
func TestMain(m *testing.M) {
	if os.Getenv("ACCELPLAN_TEST_AS_COMMAND") == "1" {
		os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
	}
	os.Exit(m.Run())
}

// workPlan takes a few seconds: enough jobs to interrupt midway.
func workPlan(out string) string {
	return `title = "resume"
seed = 17
repeats = 3
output = "` + out + `"

[object]
phase_lines = 64
readout_points = 64
fov_mm = 200

[scanner]
tr_ms = 300
reference_snr = 30

[[scheme]]
pattern = "cartesian-random"
accelerations = [2, 3, 4, 5]
calibration_lines = 8

[[scheme]]
pattern = "cartesian-uniform"
accelerations = [1, 2]
calibration_lines = 8

[[recon]]
method = "zero-filled"

[[recon]]
method = "fista-wavelet"
wavelet = "db2"
levels = 3
iterations = 80

[accept]
metric = "ssim"
threshold = 0.6
`
}

// timingInReport matches the report's clock and run conditions.
var timingInReport = []*regexp.Regexp{
	regexp.MustCompile(`<dt>(workers|run time|generated)</dt><dd>[^<]*</dd>`),
	regexp.MustCompile(`\d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC`),
}

// folderContents returns every file of a results folder, with the timing
// fields (recon_seconds in results.csv, the manifest's clock) removed.
func folderContents(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	files := map[string][]byte{}
	err := filepath.Walk(dir, func(path string, fi os.FileInfo, err error) error {
		if err != nil || fi.IsDir() {
			return err
		}
		rel, _ := filepath.Rel(dir, path)
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		switch rel {
		case "manifest.json":
			return nil // tool version, plan hash and seeds are checked elsewhere; it holds the clock
		case "results.csv":
			b = dropColumn(t, b, "recon_seconds")
		case "report.html":
			for _, re := range timingInReport {
				b = re.ReplaceAll(b, nil)
			}
		}
		files[rel] = b
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

func dropColumn(t *testing.T, b []byte, name string) []byte {
	rows, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := -1
	for i, h := range rows[0] {
		if h == name {
			col = i
		}
	}
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	for _, r := range rows {
		if col >= 0 {
			r = append(r[:col:col], r[col+1:]...)
		}
		w.Write(r)
	}
	w.Flush()
	return buf.Bytes()
}

func sameFolders(t *testing.T, want, got string) {
	t.Helper()
	a, b := folderContents(t, want), folderContents(t, got)
	var names []string
	for k := range a {
		names = append(names, k)
	}
	sort.Strings(names)
	if len(a) != len(b) {
		t.Errorf("%d files against %d", len(a), len(b))
	}
	for _, k := range names {
		if !bytes.Equal(a[k], b[k]) {
			t.Errorf("%s differs", k)
		}
	}
}

func journalLines(dir string) int {
	n := 0
	files, _ := filepath.Glob(filepath.Join(dir, "*.jsonl"))
	for _, f := range files {
		fh, err := os.Open(f)
		if err != nil {
			continue
		}
		sc := bufio.NewScanner(fh)
		for sc.Scan() {
			n++
		}
		fh.Close()
	}
	return n
}

// A run killed with SIGKILL midway resumes from its journal, and the final
// folder equals that of an uninterrupted run, timing fields aside.
func TestKillAndResume(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the command three times")
	}
	dir := t.TempDir()
	ref := filepath.Join(dir, "ref")
	plan := filepath.Join(dir, "p.toml")
	write(t, plan, workPlan(filepath.Join(dir, "res")))
	if code, _, stderr := runCmd("run", "-quiet", "-out", ref, plan); code != 0 {
		t.Fatalf("reference run: %s", stderr)
	}
	total := journalLines(filepath.Join(dir, ".ref.journal"))

	res := filepath.Join(dir, "res")
	cmd := exec.Command(os.Args[0], "run", "-quiet", "-workers", "1", plan)
	cmd.Env = append(os.Environ(), "ACCELPLAN_TEST_AS_COMMAND=1")
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	jdir := filepath.Join(dir, ".res.journal")
	deadline := time.Now().Add(60 * time.Second)
	for journalLines(jdir) < total/3 && time.Now().Before(deadline) {
		time.Sleep(5 * time.Millisecond)
	}
	cmd.Process.Signal(syscall.SIGKILL)
	cmd.Wait()
	done := journalLines(jdir)
	if done == 0 || done >= total {
		t.Fatalf("the kill came at %d of %d jobs; want it midway", done, total)
	}
	if _, err := os.Stat(filepath.Join(res, "results.csv")); err == nil {
		t.Fatal("a killed run left a results folder")
	}
	code, _, stderr := runCmd("run", "-quiet", plan)
	if code != 0 {
		t.Fatalf("resumed run: %s", stderr)
	}
	if !strings.Contains(stderr, "jobs in the journal") {
		t.Errorf("the resumed run did not say it used the journal: %q", stderr)
	}
	if n := journalLines(jdir); n != total {
		t.Errorf("journal holds %d lines after resuming, want %d (each job once)", n, total)
	}
	sameFolders(t, ref, res)
}

// Shards computed separately and merged give the folder of a local run, for
// any shard count; an incomplete merge is refused.
func TestShardsMergeToLocalRun(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the command several times")
	}
	dir := t.TempDir()
	plan := filepath.Join(dir, "p.toml")
	// Four (candidate, method) groups, so that every shard of 2 and 3 has work.
	write(t, plan, strings.Replace(quickPlan(filepath.Join(dir, "unused")), "accelerations = [1, 2]", "accelerations = [1, 2, 3, 4]", 1))
	ref := filepath.Join(dir, "ref")
	if code, _, stderr := runCmd("run", "-quiet", "-out", ref, plan); code != 0 {
		t.Fatalf("local run: %s", stderr)
	}
	for _, n := range []int{2, 3} {
		res := filepath.Join(dir, "sharded", strings.Repeat("x", n))
		for i := 1; i <= n; i++ {
			if i == n {
				code, _, stderr := runCmd("merge", "-out", res, plan)
				if code == 0 || !strings.Contains(stderr, "missing") {
					t.Errorf("merge before the last shard: exit %d, %q", code, stderr)
				}
			}
			args := []string{"run", "-quiet", "-out", res, "-shard", strings.Join([]string{itoa(i), itoa(n)}, "/"), plan}
			if code, _, stderr := runCmd(args...); code != 0 {
				t.Fatalf("shard %d/%d: %s", i, n, stderr)
			}
		}
		if _, err := os.Stat(filepath.Join(res, "results.csv")); err == nil {
			t.Fatal("a shard wrote results")
		}
		if code, _, stderr := runCmd("merge", "-out", res, plan); code != 0 {
			t.Fatalf("merge of %d shards: %s", n, stderr)
		}
		sameFolders(t, ref, res)
	}
}

func itoa(i int) string { return string(rune('0' + i)) }

func TestShardFromEnvironment(t *testing.T) {
	cases := []struct {
		flag   string
		shards int
		env    map[string]string
		i, n   int
		bad    bool
	}{
		{"", 0, nil, 0, 1, false},
		{"2/8", 0, nil, 1, 8, false},
		{"9/8", 0, nil, 0, 0, true},
		{"", 0, map[string]string{"SLURM_ARRAY_TASK_ID": "3", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_COUNT": "4"}, 3, 4, false},
		{"", 0, map[string]string{"SLURM_ARRAY_TASK_ID": "5", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_COUNT": "5"}, 4, 5, false},
		{"", 0, map[string]string{"SLURM_ARRAY_TASK_ID": "7", "SLURM_ARRAY_TASK_COUNT": "4"}, 0, 0, true},
		{"", 6, map[string]string{"JOB_COMPLETION_INDEX": "5"}, 5, 6, false},
		{"", 0, map[string]string{"JOB_COMPLETION_INDEX": "1"}, 0, 0, true},
	}
	for _, c := range cases {
		i, n, err := shardFromFlagsOrEnv(c.flag, c.shards, func(k string) string { return c.env[k] })
		if c.bad != (err != nil) || (!c.bad && (i != c.i || n != c.n)) {
			t.Errorf("%q %d %v: got %d/%d err %v", c.flag, c.shards, c.env, i, n, err)
		}
	}
}

// An edited plan recomputes only the points its edit changes: jobs are
// journaled by content, so adding an acceleration and relabelling a scheme
// reuse every earlier job.
func TestEditedPlanReusesJournal(t *testing.T) {
	dir := t.TempDir()
	plan := filepath.Join(dir, "p.toml")
	base := quickPlan(filepath.Join(dir, "res"))
	write(t, plan, base)
	if code, _, stderr := runCmd("run", "-quiet", plan); code != 0 {
		t.Fatalf("first run: %s", stderr)
	}
	edited := strings.Replace(base, "accelerations = [1, 2]", "accelerations = [1, 2, 4]", 1)
	edited = strings.Replace(edited, `pattern = "cartesian-uniform"`, "label = \"renamed\"\npattern = \"cartesian-uniform\"", 1)
	write(t, plan, edited)
	code, stdout, stderr := runCmd("run", "-quiet", plan)
	if code != 0 {
		t.Fatalf("edited run: %s", stderr)
	}
	// 2 old candidates × 2 draws come from the journal; the new R = 4
	// candidate's 2 draws are computed.
	if !strings.Contains(stdout, "(2 jobs computed, 4 from the journal") {
		t.Errorf("want 2 computed and 4 reused, got: %s", stdout)
	}
}
