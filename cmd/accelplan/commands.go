package main

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"text/tabwriter"

	"accelplan/out"
	"accelplan/plans"
)

func cmdRun(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	return runOrMerge(ctx, "run", args, stdout, stderr)
}

func cmdMerge(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	return runOrMerge(ctx, "merge", args, stdout, stderr)
}

// runOrMerge runs a plan (or a shard of it), or merges the journals of its
// shards into the results folder.
func runOrMerge(ctx context.Context, name string, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(name, stderr)
	workers := fs.Int("workers", 0, "worker goroutines (0: one per core); results do not depend on it")
	outDir := fs.String("out", "", "results folder (overrides the plan's output key)")
	quiet := fs.Bool("quiet", false, "no progress display")
	fresh := fs.Bool("fresh", false, "ignore and clear the journal of earlier runs of this results folder")
	shard := fs.String("shard", "", "compute only shard I of N (\"I/N\", 1-based); taken from SLURM_ARRAY_TASK_ID or JOB_COMPLETION_INDEX when set")
	shards := fs.Int("shards", 0, "number of shards when the index comes from the environment")
	builtin := fs.String("builtin", "", "run a built-in plan by name: "+strings.Join(plans.BuiltinNames(), ", "))
	fs.Usage = func() {
		if name == "merge" {
			fmt.Fprintln(stderr, "usage: accelplan merge [-out DIR] [PLAN.toml]   (after every shard has run)")
		} else {
			fmt.Fprintln(stderr, "usage: accelplan run [-workers N] [-out DIR] [-quiet] [-fresh] [-shard I/N] [-builtin NAME | PLAN.toml]")
		}
		fs.PrintDefaults()
	}
	pos, err := parseArgs(fs, args)
	if err != nil {
		return errUsage
	}
	if len(pos) > 1 || (len(pos) == 1 && *builtin != "") {
		fs.Usage()
		return errUsage
	}
	var p *plans.Plan
	switch {
	case len(pos) == 1:
		if p, err = plans.Load(pos[0]); err != nil {
			return err
		}
	case *builtin != "":
		if p, err = plans.LoadBuiltinNamed(*builtin); err != nil {
			return err
		}
	default:
		p = plans.LoadBuiltin()
		fmt.Fprintln(stderr, "accelplan: no plan given, running the built-in plan (write it out with `accelplan new plan.toml`)")
	}
	if *workers < 0 {
		return fmt.Errorf("-workers must be 0 (all cores) or more, got %d", *workers)
	}
	for _, n := range p.ImageNotices {
		fmt.Fprintf(stderr, "accelplan: object.image: %s\n", n)
	}
	dir := p.Output
	if *outDir != "" {
		dir = *outDir
	}
	opt := plans.Options{Workers: *workers, Merge: name == "merge"}
	if name == "run" {
		if opt.Shard, opt.Shards, err = shardFromFlagsOrEnv(*shard, *shards, os.Getenv); err != nil {
			return err
		}
	}
	need, err := plans.MemoryNeeded(p, cmp.Or(*workers, runtime.GOMAXPROCS(0)))
	if err != nil {
		return err
	}
	if err := plans.CheckMemory(p, need, plans.AvailableMemory()); err != nil {
		return err
	}
	sharded := opt.Shards > 1
	var stage *out.Stage
	if !sharded {
		// Check the results folder can be written before any work.
		if stage, err = out.NewStage(dir); err != nil {
			return err
		}
		defer stage.Abandon()
	}
	jdir := plans.JournalDir(dir)
	if *fresh {
		if err := os.RemoveAll(jdir); err != nil {
			return fmt.Errorf("cannot clear the journal %s: %w", jdir, err)
		}
	}
	journal, err := plans.OpenJournal(jdir, opt.WriterName())
	if err != nil {
		return err
	}
	defer journal.Close()
	opt.Journal = journal

	n := *workers
	if n == 0 {
		n = runtime.GOMAXPROCS(0)
	}
	what := fmt.Sprintf("%d candidates × %d methods × %d noise draws", countCandidates(p), len(p.Recons), p.Repeats)
	if sharded {
		what += fmt.Sprintf(", shard %d of %d", opt.Shard+1, opt.Shards)
	}
	if journal.Len() > 0 && !opt.Merge {
		what += fmt.Sprintf(", %d jobs in the journal", journal.Len())
	}
	fmt.Fprintf(stderr, "accelplan: %s — %s on %d workers\n", p.Title, what, n)
	bar := newProgress(stderr, *quiet)
	cpu0 := cpuSeconds()
	o, err := plans.Run(ctx, p, plans.Options{Workers: n, Progress: bar.update, Journal: journal,
		Shard: opt.Shard, Shards: opt.Shards, Merge: opt.Merge})
	bar.finish()
	if err == nil {
		o.CPUSeconds = cpuSeconds() - cpu0
	}
	if err != nil {
		if errors.Is(err, context.Canceled) {
			fmt.Fprintf(stderr, "accelplan: finished jobs are kept in %s; run the same command again to resume\n", jdir)
		}
		return err
	}
	if sharded {
		fmt.Fprintf(stderr, "accelplan: shard %d of %d done (%d jobs computed, %d from the journal) in %s\n", opt.Shard+1, opt.Shards,
			o.Computed, o.Restored, jdir)
		if o.Complete {
			fmt.Fprintf(stderr, "accelplan: every job of the plan is in the journal; write the results with `accelplan merge -out %s %s`\n", dir, p.Source)
		}
		return nil
	}
	a := plans.Analyse(o)
	if len(p.NoiseMaps) > 0 {
		fmt.Fprintf(stderr, "accelplan: noise maps by pseudo-replicas for %d points\n", len(p.NoiseMaps))
		if o.NoiseMaps, err = plans.NoiseMaps(ctx, o); err != nil {
			return err
		}
	}
	if err := writeFolder(stage.Dir(), o, a, version, caution); err != nil {
		return err
	}
	if err := stage.Commit(); err != nil {
		return err
	}
	printRecommendation(stdout, o, a, dir)
	fmt.Fprintf(stdout, "(%d jobs computed, %d from the journal, %.1f s%s)\n\n%s\n", o.Computed, o.Restored, o.Elapsed.Seconds(), runUsage(o), caution)
	return nil
}

// shardFromFlagsOrEnv returns the 0-based shard index and count from the
// -shard flag ("I/N", 1-based), or from a Slurm job array
// (SLURM_ARRAY_TASK_ID with SLURM_ARRAY_TASK_MIN and SLURM_ARRAY_TASK_COUNT)
// or a Kubernetes Indexed Job (JOB_COMPLETION_INDEX, 0-based, with -shards).
func shardFromFlagsOrEnv(flagVal string, shards int, env func(string) string) (int, int, error) {
	if flagVal != "" {
		var i, n int
		if _, err := fmt.Sscanf(flagVal, "%d/%d", &i, &n); err != nil || n < 1 || i < 1 || i > n {
			return 0, 0, fmt.Errorf("-shard %q: want I/N with 1 ≤ I ≤ N, e.g. -shard 2/8", flagVal)
		}
		return i - 1, n, nil
	}
	if shards < 0 {
		return 0, 0, fmt.Errorf("-shards must be at least 1, got %d", shards)
	}
	if id := env("SLURM_ARRAY_TASK_ID"); id != "" {
		i, err1 := strconv.Atoi(id)
		lo, err2 := strconv.Atoi(cmp.Or(env("SLURM_ARRAY_TASK_MIN"), "0"))
		n := shards
		if n == 0 {
			var err error
			if n, err = strconv.Atoi(env("SLURM_ARRAY_TASK_COUNT")); err != nil {
				return 0, 0, fmt.Errorf("SLURM_ARRAY_TASK_ID is set but SLURM_ARRAY_TASK_COUNT is not a number; pass -shards N")
			}
		}
		if err1 != nil || err2 != nil || i-lo < 0 || i-lo >= n {
			return 0, 0, fmt.Errorf("Slurm array task %q (min %q) is not in 0..%d; submit the array as --array=0-%d", id, env("SLURM_ARRAY_TASK_MIN"), n-1, n-1)
		}
		return i - lo, n, nil
	}
	if id := env("JOB_COMPLETION_INDEX"); id != "" {
		i, err := strconv.Atoi(id)
		if shards < 1 {
			return 0, 0, fmt.Errorf("JOB_COMPLETION_INDEX is set: pass -shards N with the Job's completions count")
		}
		if err != nil || i < 0 || i >= shards {
			return 0, 0, fmt.Errorf("JOB_COMPLETION_INDEX %q is not in 0..%d", id, shards-1)
		}
		return i, shards, nil
	}
	return 0, 1, nil
}

func countCandidates(p *plans.Plan) int {
	n := 0
	for _, s := range p.Schemes {
		n += len(s.Accelerations)
	}
	return n
}

func cmdNew(args []string, stdout, stderr io.Writer) error {
	if len(args) > 1 {
		fmt.Fprintln(stderr, "usage: accelplan new [FILE.toml]")
		return errUsage
	}
	if len(args) == 0 {
		_, err := stdout.Write(plans.Builtin())
		return err
	}
	path := args[0]
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		if errors.Is(err, os.ErrExist) {
			return fmt.Errorf("%s already exists; choose another name or remove it first", path)
		}
		return fmt.Errorf("cannot write the starter plan: %w", err)
	}
	if _, err := f.Write(plans.Builtin()); err != nil {
		f.Close()
		os.Remove(path)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	fmt.Fprintf(stderr, "accelplan: wrote %s; edit it, then run `accelplan run %s`\n", path, path)
	return nil
}

func cmdCheck(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("check", stderr)
	workers := fs.Int("workers", 0, "worker goroutines the estimate is for (0: one per core)")
	quick := fs.Bool("no-calibration", false, "skip the short calibration run (no time estimate)")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: accelplan check [-workers N] [-no-calibration] PLAN.toml")
		fs.PrintDefaults()
	}
	pos, err := parseArgs(fs, args)
	if err != nil {
		return errUsage
	}
	if len(pos) != 1 {
		fs.Usage()
		return errUsage
	}
	p, err := plans.Load(pos[0])
	if err != nil {
		return err
	}
	cands, err := plans.Candidates(p)
	if err != nil {
		return err
	}
	n := *workers
	if n <= 0 {
		n = runtime.GOMAXPROCS(0)
	}
	fmt.Fprintf(stdout, "%s: valid plan %q (%s)\n", pos[0], p.Title, p.Modality)
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "scheme\tasked R\tachieved R\tshots\tscan time")
	for _, c := range cands {
		fmt.Fprintf(tw, "%s\t%g\t%.2f\t%d %s\t%s\n", p.Schemes[c.Scheme].Label, c.AskedR, c.Sampling.R, c.Sampling.Shots, plans.ShotName(p.Schemes[c.Scheme]), duration(c.ScanTime))
	}
	tw.Flush()
	tunes := 0
	for _, r := range p.Recons {
		if r.Method != plans.MethodZeroFilled && r.Method != plans.MethodFISTABox && r.Lambda == 0 {
			tunes++
		}
	}
	fmt.Fprintf(stdout, "%d candidates × %d methods × %d scored noise draws = %d reconstructions, plus %d λ searches\n",
		len(cands), len(p.Recons), p.Repeats, len(cands)*len(p.Recons)*p.Repeats, len(cands)*tunes)
	need, err := plans.MemoryNeeded(p, n)
	if err != nil {
		return err
	}
	avail := plans.AvailableMemory()
	fmt.Fprintf(stdout, "memory: about %s on %d workers (%s available)\n", plans.FormatBytes(need), n, plans.FormatBytes(avail))
	if err := plans.CheckMemory(p, need, avail); err != nil {
		return err
	}
	if *quick {
		return nil
	}
	e, err := plans.EstimatePlan(ctx, p, n)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "time: about %s on %d workers (%d reconstructions, λ-search evaluations included; timed on the smallest and largest candidate of each scheme)\n",
		duration(e.Seconds), n, e.Recons)
	return nil
}

func printRecommendation(w io.Writer, o *plans.Outcome, a *plans.Analysis, dir string) {
	p := o.Plan
	metric := strings.ToUpper(a.Metric)
	cmp := "≥"
	if !plans.HigherIsBetter(a.Metric) {
		cmp = "≤"
	}
	fmt.Fprintf(w, "\n%s\n", p.Title)
	fmt.Fprintf(w, "bar: %s %s %g (one-sided 95%% confidence bound over %d noise draws); reference: %s, %s\n\n",
		metric, cmp, a.Threshold, p.Repeats, a.ReferenceLabel, duration(a.ReferenceTime))
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintf(tw, "scheme\tmethod\tshortest passing protocol\tscan time\t%s mean ± sd\tbound\n", metric)
	for _, cv := range a.Curves {
		s, m := p.Schemes[cv.Scheme].Label, p.Recons[cv.Recon].Label
		if cv.Pick < 0 {
			fmt.Fprintf(tw, "%s\t%s\tnone of the candidates meets the bar\t\t\t\n", s, m)
			continue
		}
		r := a.Rows[cv.Pick]
		ms := r.Metric(a.Metric)
		fmt.Fprintf(tw, "%s\t%s\tR = %.2f (%d %s)\t%s\t%.4g ± %.2g\t%.4g\n", s, m, r.R, r.Shots, r.ShotKind, duration(r.ScanTime), ms.Mean, ms.Std, r.Bound(a.Metric))
	}
	tw.Flush()
	fmt.Fprintln(w)
	if a.Best < 0 {
		fmt.Fprintf(w, "No candidate meets the bar. Lower the acceleration, add averages, or revisit the threshold.\n")
	} else {
		r := a.Rows[a.Best]
		saved := a.ReferenceTime - r.ScanTime
		fmt.Fprintf(w, "Recommended: %s, R = %.2f (%d of %d %s), reconstructed with %s.\n", r.Scheme, r.R, r.Shots, r.FullShots, r.ShotKind, r.Method)
		fmt.Fprintf(w, "It takes %s, %s less than the reference %s (%.0f%% saved); %s = %.4g, 95%% bound %.4g.\n",
			duration(r.ScanTime), duration(saved), duration(a.ReferenceTime), 100*saved/a.ReferenceTime,
			metric, r.Metric(a.Metric).Mean, r.Bound(a.Metric))
		fmt.Fprintf(w, "λ: %s.\n", r.LambdaRule)
	}
	fmt.Fprintf(w, "Report, curve, images and tables: %s\n", dir)
}

// duration formats a scan time as the summary table does (scanTimeText):
// milliseconds below a second, so that an optical acquisition does not read
// 0.0 s, seconds below a minute, m:ss above.
func duration(s float64) string { return scanTimeText(s) }

// cpuSeconds returns the user and system CPU time of this process so far.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	tv := func(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }
	return tv(ru.Utime) + tv(ru.Stime)
}

// runUsage describes how well the sweep used the machine: CPU utilisation
// over the workers, and the share of worker time spent outside the solvers.
func runUsage(o *plans.Outcome) string {
	if o.Computed == 0 || o.Elapsed <= 0 {
		return ""
	}
	u := fmt.Sprintf(", CPU %.0f%% of %d cores", 100*o.CPUSeconds/(o.Elapsed.Seconds()*float64(o.Workers)), o.Workers)
	if o.JobSeconds > 0 {
		u += fmt.Sprintf(", %.1f%% of worker time outside reconstruction", 100*(o.JobSeconds-o.ReconSeconds)/o.JobSeconds)
	}
	return u
}
