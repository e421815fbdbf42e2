// Command pulsewright is the Pulsewright workbench and its command line:
// it serves the live page, and evaluates, checks and links scenarios.
//
// Run "pulsewright help" for the subcommands.
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"github.com/pulsewright/pulsewright/scenarios"
)

// Exit codes.
const (
	exitOK      = 0
	exitFailure = 1 // I/O and internal errors
	exitInvalid = 2 // bad scenario, usage or flags
	exitMasked  = 3 // sweep --fail-if-masked: the target is detected at no point
	// exitInterrupted follows the shell's 128 + SIGINT.
	exitInterrupted = 130
)

const usage = `pulsewright: a pulse-compression workbench for radar waveform design.

Usage:
  pulsewright [serve] [flags]        run the workbench (web page) on a demo scenario
  pulsewright check SCENARIO         validate; print a canonical summary
  pulsewright link SCENARIO          print the scenario's share link
  pulsewright eval SCENARIO          print the report JSON (--format text for a table)
  pulsewright sweep SCENARIO --set PATH=START:STOP:STEP [--set …] [--out FILE.csv]
                     [--html FILE.html] [--fail-if-masked ID] [--jobs N]
                     [--shard K/N]   evaluate a grid of variants; one CSV row per point
                                     (--shard: only points i with i mod N = K, for merge)
  pulsewright merge SHARD.csv… [--out FILE.csv] [--fail-if-masked ID] [--format F]
                                     join the shards of one sweep (or trials run) into the
                                     unsharded output; refuses shards of other scenarios,
                                     grids or engines
  pulsewright report SCENARIO -o FILE.html
                                     write a self-contained HTML report for a customer
  pulsewright export SCENARIO [--sigmf BASE] [--csv FILE]
                                     write the raw I/Q as SigMF, the profile as CSV
  pulsewright pd [--swerling 0-4] [--pulses N] [--integration noncoherent|coherent]
                 [--pfa P] [--cfar-cells M [--os-rank K]] [--pd-required 0.9] [--from --to --step]
                 [--ref-range-m R --ref-snr-db S] [--csv] [--html FILE.html]
                                     Pd against SNR per pulse (or against range, R⁴ law,
                                     from a reference point) and the SNR a required Pd needs
  pulsewright trials SCENARIO [-n 1000] [-j N] [--first I] [--format text|json|csv] [-o FILE] [--shard K/N]
                     [--time-limit 10m] [--units U]
                                     Monte Carlo: N noisy realisations through the engine; each
                                     target's empirical Pd (95 % interval) beside the analytic Pd,
                                     and the false alarms counted against Pfa × cells
  pulsewright coverage SCENARIO --target ID [--from M --to M] [--points 200] [--by range|snr]
                     [--format table|csv|html] [-o FILE] [--units U]
                                     Pd curves of one target: against range (moved through the
                                     window, RCS kept) and against SNR; its detection range
  pulsewright blindzones --pri T1,T2,… --tau S --carrier HZ [--pulses N1,N2,…] [--m M]
                     [--range MIN:MAX] [--rate V] [--cells 100x40] [--format table|csv|html] [-o FILE]
                                     map where a PRF schedule is blind (eclipsed or at a
                                     blind speed) in range × range rate, and what M-of-N sees
  pulsewright demos                  list the built-in scenarios
  pulsewright import FILE --into SCENARIO [--as waveform|filter] [--rate HZ] [--bandwidth HZ]
                                     write a recorded pulse (SigMF cf32_le or CSV) into a
                                     scenario as its waveform or receive filter; print it
                                     (export --pulse-sigmf BASE writes a scenario's pulse)
  pulsewright version [--format json]
                                     print the engine's version, commit and format versions
  pulsewright help                   show this text

SCENARIO is a file path, - for standard input, a share link (a whole URL or
just its #s= part), or demo:NAME for a built-in scene.

--units U on check, eval --format text, pd (table), blindzones (table),
coverage (table) and trials (text) prints ranges, speeds and range rates in other units, e.g. --units km,kt
or --units nautical,closing: a system (si, metric, nautical), units (m, km,
nmi, m/s, km/h, kt, ft) and a range-rate sign (opening or closing
positive). Files, links, JSON, CSV and HTML stay SI. See docs/units.md.

PATH is a JSON path into the scenario: receiver.window.sidelobe_db,
targets[1].range_m or targets[skiff].rcs_dbsm. PATH=VALUE sets a fixed
value (receiver.window.kind=taylor), PATH=V1,V2 a list.

Exit status: 0 success, 1 I/O or internal error, 2 invalid scenario or usage,
3 sweep or merge --fail-if-masked target never detected, 130 interrupted (the rows
or trials done are written).
`

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes one command line and returns the exit status.
func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	cmd := "serve"
	if len(args) > 0 && (len(args[0]) == 0 || args[0][0] != '-') {
		cmd, args = args[0], args[1:]
	}
	// Text for people passes through termSafe; the CSV of a sweep is data
	// and goes raw unless it lands on a terminal, and the progress bar
	// writes to the raw standard error.
	out := stdout
	if (cmd != "sweep" && cmd != "merge") || isTerminal(stdout) {
		out = newTermSafe(stdout)
	}
	env := &env{ctx: ctx, stdin: stdin, stdout: out, stderr: newTermSafe(stderr), rawStderr: stderr}
	var err error
	switch cmd {
	case "check":
		err = env.check(args)
	case "link":
		err = env.link(args)
	case "eval":
		err = env.eval(args)
	case "sweep":
		err = env.sweep(args)
	case "merge":
		err = env.merge(args)
	case "report":
		err = env.report(args)
	case "export":
		err = env.export(args)
	case "pd":
		err = env.pd(args)
	case "trials":
		err = env.trials(args)
	case "coverage":
		err = env.coverage(args)
	case "demos":
		err = env.demos(args)
	case "blindzones":
		err = env.blindzones(args)
	case "serve":
		err = env.serve(args)
	case "import":
		err = env.importSamples(args)
	case "version", "--version":
		err = env.version(args)
	case "help", "-h", "--help":
		fmt.Fprint(stdout, usage)
		return exitOK
	default:
		fmt.Fprintf(stderr, "pulsewright: unknown command %q\n\n%s", cmd, usage)
		return exitInvalid
	}
	return env.exit(err)
}

// env carries the streams of one invocation.
type env struct {
	ctx    context.Context
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	// rawStderr is stderr without termSafe, for the progress bar's \r.
	rawStderr io.Writer
}

// usageError is a mistake on the command line.
type usageError struct{ msg string }

func (e usageError) Error() string { return e.msg }

// statusError ends the program with its own exit status and message.
type statusError struct {
	code int
	msg  string
}

func (e statusError) Error() string { return e.msg }

// exit prints err, if any, and maps it to an exit status.
func (e *env) exit(err error) int {
	var ue usageError
	var ve *scenarios.ValidationError
	var se statusError
	switch {
	case err == nil:
		return exitOK
	case errors.As(err, &se):
		fmt.Fprintf(e.stderr, "pulsewright: %s\n", se.msg)
		return se.code
	case errors.As(err, &ue):
		fmt.Fprintf(e.stderr, "pulsewright: %s\n\nRun 'pulsewright help' for usage.\n", ue.msg)
		return exitInvalid
	case errors.As(err, &ve):
		fmt.Fprintf(e.stderr, "pulsewright: invalid scenario, %d problem(s):\n", len(ve.Fields))
		for _, f := range ve.Fields {
			fmt.Fprintf(e.stderr, "  %s\n", f.Error())
		}
		return exitInvalid
	case errors.Is(err, scenarios.ErrInvalid), errors.Is(err, scenarios.ErrNotFound):
		fmt.Fprintf(e.stderr, "pulsewright: %v\n", err)
		return exitInvalid
	default:
		fmt.Fprintf(e.stderr, "pulsewright: %v\n", err)
		return exitFailure
	}
}
