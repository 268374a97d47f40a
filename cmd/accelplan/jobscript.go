package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"text/template"

	"accelplan/plans"
)

// jobScript is a Slurm batch script that runs one shard per array task and
// the merge as a dependent job.
var jobScript = template.Must(template.New("job").Parse(`#!/bin/bash
# Slurm job array for the accelplan plan {{.Plan}}
# Submit with:   sbatch {{.Name}}
# Each array task computes one shard of the sweep into the journal beside the
# results folder; when all have finished, a dependent job merges them into
# {{.Out}}. Rerunning a failed task resumes it from the journal.
#SBATCH --job-name=accelplan-shards
#SBATCH --array=0-{{.Last}}
#SBATCH --cpus-per-task={{.CPUs}}
#SBATCH --output={{.Logs}}/shard-%a.log
set -euo pipefail
cd {{.Dir}}
{{.Exe}} run -quiet -workers {{.CPUs}} -shards {{.Shards}} -out {{.Out}} {{.Plan}}
if [ "${SLURM_ARRAY_TASK_ID}" = "0" ]; then
  sbatch --dependency=afterok:${SLURM_ARRAY_JOB_ID} --job-name=accelplan-merge \
    --output={{.Logs}}/merge.log --wrap="cd {{.Dir}} && {{.Exe}} merge -out {{.Out}} {{.Plan}}"
fi
`))

func shellQuote(s string) string {
	if s != "" && strings.IndexFunc(s, func(r rune) bool {
		return !(r == '/' || r == '.' || r == '-' || r == '_' || r == '+' || r == ':' || r == '=' ||
			(r >= '0' && r <= '9') || (r >= 'a' && r <= 'z') || (r >= 'A' && r <= 'Z'))
	}) < 0 {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}

func cmdJobScript(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("jobscript", stderr)
	shards := fs.Int("shards", 8, "number of array tasks")
	cpus := fs.Int("cpus", 2, "cores per task")
	outDir := fs.String("out", "", "results folder (overrides the plan's output key)")
	exe := fs.String("exe", "", "path of the accelplan binary on the cluster (default: this binary)")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: accelplan jobscript [-shards N] [-cpus C] [-out DIR] [-exe PATH] PLAN.toml > job.sh")
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
	if *shards < 1 || *shards > 10000 || *cpus < 1 || *cpus > 1024 {
		return fmt.Errorf("-shards must be 1..10000 and -cpus 1..1024, got %d and %d", *shards, *cpus)
	}
	p, err := plans.Load(pos[0])
	if err != nil {
		return err
	}
	planPath, err := filepath.Abs(pos[0])
	if err != nil {
		return err
	}
	dir := p.Output
	if *outDir != "" {
		dir = *outDir
	}
	out, err := filepath.Abs(dir)
	if err != nil {
		return err
	}
	bin := *exe
	if bin == "" {
		if bin, err = os.Executable(); err != nil {
			return fmt.Errorf("cannot find this binary; pass -exe: %w", err)
		}
	}
	wd, err := os.Getwd()
	if err != nil {
		return err
	}
	return jobScript.Execute(stdout, map[string]any{
		"Plan": shellQuote(planPath), "Name": "job.sh", "Out": shellQuote(out), "Last": *shards - 1, "Shards": *shards,
		"CPUs": *cpus, "Logs": shellQuote(filepath.Dir(out)), "Dir": shellQuote(wd), "Exe": shellQuote(bin),
	})
}
