package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"
	"text/tabwriter"

	"accelplan/out"
	"accelplan/plans"
)

func cmdRun(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("run", stderr)
	workers := fs.Int("workers", 0, "worker goroutines (0: one per core); results do not depend on it")
	outDir := fs.String("out", "", "results folder (overrides the plan's output key)")
	quiet := fs.Bool("quiet", false, "no progress display")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: accelplan run [-workers N] [-out DIR] [-quiet] [PLAN.toml]")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		return errUsage
	}
	if fs.NArg() > 1 {
		fs.Usage()
		return errUsage
	}
	var p *plans.Plan
	if fs.NArg() == 0 {
		p = plans.LoadBuiltin()
		fmt.Fprintln(stderr, "accelplan: no plan given, running the built-in plan (write it out with `accelplan new plan.toml`)")
	} else {
		var err error
		if p, err = plans.Load(fs.Arg(0)); err != nil {
			return err
		}
	}
	if *workers < 0 {
		return fmt.Errorf("-workers must be 0 (all cores) or more, got %d", *workers)
	}
	dir := p.Output
	if *outDir != "" {
		dir = *outDir
	}
	stage, err := out.NewStage(dir)
	if err != nil {
		return err
	}
	defer stage.Abandon()

	n := *workers
	if n == 0 {
		n = runtime.GOMAXPROCS(0)
	}
	fmt.Fprintf(stderr, "accelplan: %s — %d candidates × %d methods × %d noise draws on %d workers\n",
		p.Title, countCandidates(p), len(p.Recons), p.Repeats, n)
	bar := newProgress(stderr, *quiet)
	o, err := plans.Run(ctx, p, plans.Options{Workers: n, Progress: bar.update})
	bar.finish()
	if err != nil {
		return err
	}
	a := plans.Analyse(o)
	if err := writeFolder(stage.Dir(), o, a, version, caution); err != nil {
		return err
	}
	if err := stage.Commit(); err != nil {
		return err
	}
	printRecommendation(stdout, o, a, dir)
	fmt.Fprintf(stdout, "\n%s\n", caution)
	return nil
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

func cmdCheck(args []string, stdout io.Writer) error {
	if len(args) != 1 {
		return fmt.Errorf("usage: accelplan check PLAN.toml")
	}
	p, err := plans.Load(args[0])
	if err != nil {
		return err
	}
	cands, err := plans.Candidates(p)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "%s: valid plan %q\n", args[0], p.Title)
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "scheme\tasked R\tachieved R\tshots\tscan time")
	for _, c := range cands {
		fmt.Fprintf(tw, "%s\t%g\t%.2f\t%d %s\t%s\n", p.Schemes[c.Scheme].Label, c.AskedR, c.Sampling.R, c.Sampling.Shots, plans.ShotName(p.Schemes[c.Scheme]), duration(c.ScanTime))
	}
	tw.Flush()
	tunes := 0
	for _, r := range p.Recons {
		if r.Method != plans.MethodZeroFilled && r.Lambda == 0 {
			tunes++
		}
	}
	fmt.Fprintf(stdout, "%d candidates × %d methods × %d scored noise draws = %d reconstructions, plus %d λ searches\n",
		len(cands), len(p.Recons), p.Repeats, len(cands)*len(p.Recons)*p.Repeats, len(cands)*tunes)
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
	fmt.Fprintf(w, "Curve, images and tables: %s (computed in %.1f s)\n", dir, o.Elapsed.Seconds())
}

// duration formats a scan time: m:ss from a minute up, seconds with one
// decimal below.
func duration(s float64) string {
	if s < 59.95 {
		return fmt.Sprintf("%.1f s", s)
	}
	return out.FormatMinSec(s)
}
