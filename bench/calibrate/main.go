// Command calibrate is the full calibration harness (package calib): it
// audits clean tables over the whole grid and tables with planted defects
// with the default options of `pcqc run`, and prints the false-alarm and
// detection rates against the targets.
//
//	go run ./bench/calibrate [-tables N] [-defects D] [-seed S] [-workers W]
//
// It exits 1 when a target is missed, so that a script can tell.
package main

import (
	"flag"
	"fmt"
	"os"
	"runtime"
	"time"

	"pcqc/internal/calib"
)

func main() {
	tables := flag.Int("tables", 30, "clean tables per grid cell")
	defects := flag.Int("defects", 100, "tables per planted defect")
	seed := flag.Uint64("seed", 20240612, "seed of the whole run")
	workers := flag.Int("workers", runtime.NumCPU(), "tables audited at once (results do not depend on it)")
	perms := flag.Int("permutations", 0, "parallel-analysis permutations (0: the default of pcqc run)")
	boot := flag.Int("bootstrap", 0, "bootstrap resamples (0: the default of pcqc run)")
	maxN := flag.Int("max-n", 0, "leave out grid cells with more samples (0: none); for a reduced run")
	quiet := flag.Bool("quiet", false, "no progress lines on stderr")
	flag.Parse()

	cells, infeasible := calib.FullGrid()
	if *maxN > 0 {
		kept := cells[:0]
		for _, c := range cells {
			if c.N <= *maxN {
				kept = append(kept, c)
			}
		}
		cells = kept
	}
	specs := calib.Plan(cells, *tables, *defects)
	fmt.Printf("pcqc calibration: %d grid cells × %d clean tables, %d defects × %d tables, seed %d\n",
		len(cells), *tables, len(calib.Defects), *defects, *seed)
	fmt.Printf("Cells left out (the design cannot separate k components there):")
	for _, c := range infeasible {
		if c.Tail == calib.Gaussian {
			fmt.Printf(" (%d,%d,%d)", c.N, c.P, c.K)
		}
	}
	fmt.Printf("\nand for t%d only, whose eigenvalues have a larger sampling error:", calib.TDegrees)
	for _, c := range infeasible {
		if c.Tail != calib.Gaussian {
			if _, ok := calib.Spectrum(c.N, c.P, c.K, calib.Gaussian); ok {
				fmt.Printf(" (%d,%d,%d)", c.N, c.P, c.K)
			}
		}
	}
	fmt.Printf("\n\n")
	start := time.Now()
	done := 0
	outs := calib.Run(specs, *seed, calib.Settings{Permutations: *perms, Bootstrap: *boot}, *workers, func(o calib.Outcome) {
		done++
		if !*quiet && (done%20 == 0 || done == len(specs)) {
			fmt.Fprintf(os.Stderr, "%d/%d tables, %s\n", done, len(specs), time.Since(start).Round(time.Second))
		}
	})
	s := calib.Tally(outs)
	s.Write(os.Stdout)
	v := s.Violations(calib.Targets)
	fmt.Printf("\nTargets missed: %d\n", len(v))
	for _, m := range v {
		fmt.Printf("  %s\n", m)
	}
	fmt.Printf("(%s)\n", time.Since(start).Round(time.Second))
	if len(v) > 0 {
		os.Exit(1)
	}
}
