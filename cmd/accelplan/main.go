// Command accelplan finds the shortest imaging protocol that still meets a
// quality bar. It reads a plan file, simulates every candidate sampling scheme
// and acceleration from an analytic phantom under realistic noise,
// reconstructs each with classical priors, scores it against the truth over
// repeated noise draws and reports the quality-versus-scan-time curve and the
// recommended protocol.
//
// Usage:
//
//	accelplan run [-workers N] [-out DIR] [PLAN.toml]   run a plan (the built-in one if none is given)
//	accelplan new [FILE.toml]                            write an annotated starter plan
//	accelplan check PLAN.toml                            validate a plan and list its candidates
//	accelplan version                                    print the version
//
// A simulation on digital phantoms is not a validation of a clinical
// protocol; see the caution printed by `accelplan help`.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
)

// version is the tool version written into every manifest.
const version = "0.1.0"

// caution is printed with every recommendation and in the help text.
const caution = `CAUTION: this is a simulation on digital phantoms, not a validation of a clinical
protocol. Motion, field inhomogeneity, SAR and peripheral-nerve-stimulation limits
are outside it. Before changing a protocol used on patients, defer to local
regulations, the site's physicist and licensed practice.`

const usage = `accelplan — find the shortest imaging protocol that still meets your quality bar.

It simulates each candidate sampling scheme and acceleration from an analytic
phantom under realistic noise, reconstructs it with classical priors, scores it
against the truth over repeated noise draws, and recommends the shortest scan
whose lower 95% confidence bound meets the bar.

Commands:
  accelplan run [-workers N] [-out DIR] [-fresh] [-shard I/N] [-builtin NAME | PLAN.toml]
        run a plan; with no plan, the built-in demonstration plan. Finished
        jobs are journaled: an interrupted run resumes when run again
  accelplan preview [-plan PLAN.toml -scheme N | -pattern P -matrix N] [-R R] [-wavelet-psf]
        show one sampling scheme without a sweep: R, shots, scan time, PSF
        side-lobe-to-peak, and pictures of the sampling and the PSF
  accelplan new [FILE.toml]
        write an annotated starter plan (to standard output without FILE)
  accelplan check [-workers N] PLAN.toml
        validate a plan, list its candidates, and estimate memory and time
        from a short calibration run
  accelplan merge [-out DIR] PLAN.toml
        write the results of a sweep whose shards ran separately
  accelplan jobscript [-shards N] PLAN.toml
        print a Slurm job-array script that runs the shards and the merge
  accelplan version
        print the version
  accelplan help
        print this text

`

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// exit codes
const (
	exitOK          = 0
	exitFailure     = 1
	exitUsage       = 2
	exitInterrupted = 130
)

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage, caution, "\n")
		return exitUsage
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	var err error
	switch args[0] {
	case "run":
		err = cmdRun(ctx, args[1:], stdout, stderr)
	case "merge":
		err = cmdMerge(ctx, args[1:], stdout, stderr)
	case "preview":
		err = cmdPreview(args[1:], stdout, stderr)
	case "jobscript":
		err = cmdJobScript(args[1:], stdout, stderr)
	case "new":
		err = cmdNew(args[1:], stdout, stderr)
	case "check":
		err = cmdCheck(ctx, args[1:], stdout, stderr)
	case "version":
		fmt.Fprintln(stdout, "accelplan", version)
	case "help", "-h", "-help", "--help":
		fmt.Fprint(stdout, usage, caution, "\n")
	default:
		fmt.Fprintf(stderr, "accelplan: unknown command %q\n\n%s", args[0], usage)
		return exitUsage
	}
	switch {
	case err == nil:
		return exitOK
	case errors.Is(err, context.Canceled):
		fmt.Fprintln(stderr, "accelplan: interrupted; results of earlier runs were left untouched")
		return exitInterrupted
	case errors.Is(err, errUsage):
		return exitUsage
	default:
		fmt.Fprintln(stderr, "accelplan:", err)
		return exitFailure
	}
}

// errUsage marks a usage mistake whose message was already printed.
var errUsage = errors.New("usage")

func newFlags(name string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	return fs
}

// parseArgs parses the flags of a command wherever they stand among its
// arguments (`run plan.toml -out dir` as well as `run -out dir plan.toml`)
// and returns the other arguments in order; everything after "--" is an
// argument.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var rest []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		left := fs.Args()
		if len(left) == 0 {
			return rest, nil
		}
		if used := len(args) - len(left); used > 0 && args[used-1] == "--" {
			return append(rest, left...), nil
		}
		rest, args = append(rest, left[0]), left[1:]
	}
}
