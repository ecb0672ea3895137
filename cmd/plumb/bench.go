package main

import (
	"fmt"
	"os"
	"path/filepath"
	"runtime/pprof"

	"github.com/spf13/cobra"

	"github.com/plumb-sql/plumb/cmd/internal/bench"
)

func newBenchCommand() *cobra.Command {
	cfg := bench.Config{Groups: 10000, Length: 1000, Dir: "plumb-bench", Reference: 0, Repeats: 3, Layout: bench.LayoutGroup}
	var phase, file, profile, scalingDir string
	var generate, large bool
	cmd := &cobra.Command{
		Use:   "bench",
		Short: "Time diagnose against DuckDB's own floor (and a reference-library loop) side by side",
		Long: `Generates a Parquet file of G groups x T observations (reused if present), then
runs, each in a child process of its own, DuckDB's list(v ORDER BY t) per group
(the data-movement floor) and plumb's diagnose with default options (and with
--memory-limit once more under that limit), and prints wall time (the median
of --repeat runs), groups per second, peak resident memory and the ratio to
the floor. With --reference N it also times python3-statsmodels' adfuller and kpss
over N groups of the same file and extrapolates to all groups.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if generate {
				path, err := bench.Generate(cmd.Context(), cfg)
				if err != nil {
					return err
				}
				fmt.Fprintln(cmd.OutOrStdout(), path)
				return nil
			}
			if phase != "" {
				if profile != "" {
					f, err := os.Create(profile)
					if err != nil {
						return err
					}
					defer f.Close()
					if err := pprof.StartCPUProfile(f); err != nil {
						return err
					}
					defer pprof.StopCPUProfile()
				}
				return bench.RunPhase(cmd.Context(), bench.Phase(phase), file, cfg.MemoryLimit, cmd.OutOrStdout())
			}
			self, err := os.Executable()
			if err != nil {
				return fmt.Errorf("find the plumb binary: %w", err)
			}
			if scalingDir != "" {
				if err := os.MkdirAll(scalingDir, 0o755); err != nil {
					return err
				}
				if _, err := bench.Scaling(cmd.Context(), cfg, self, bench.ScalingGrid, cmd.OutOrStdout(), filepath.Join(scalingDir, "scaling.svg")); err != nil {
					return err
				}
			}
			if large {
				_, err := bench.Large(cmd.Context(), cfg, self, cmd.OutOrStdout())
				return err
			}
			if scalingDir != "" {
				return nil
			}
			_, err = bench.Run(cmd.Context(), cfg, self, cmd.OutOrStdout())
			return err
		},
	}
	f := cmd.Flags()
	f.IntVar(&cfg.Groups, "groups", cfg.Groups, "number of groups G")
	f.IntVar(&cfg.Length, "length", cfg.Length, "observations per group T")
	f.StringVar(&cfg.Dir, "dir", cfg.Dir, "where the generated Parquet files go")
	f.IntVar(&cfg.Reference, "reference", cfg.Reference, "time the statsmodels loop on this many groups (0: skip)")
	f.IntVar(&cfg.Repeats, "repeat", cfg.Repeats, "run each phase this many times and report the median")
	f.StringVar(&cfg.Layout, "layout", cfg.Layout, "row order of the generated file: group (by group, then time) or time (by time, then group, as a table of daily appends)")
	f.StringVar(&phase, "phase", "", "run one phase in this process (used by bench itself)")
	f.StringVar(&file, "file", "", "the Parquet file for --phase")
	f.StringVar(&scalingDir, "scaling", "", "measure the scaling grid (G of 1k, 10k, 100k at T = 500; T of 100, 1k, 10k at G = 1k), print a Markdown table and draw `DIR`/scaling.svg")
	f.StringVar(&profile, "cpuprofile", "", "with --phase, write a CPU profile to `FILE`")
	f.StringVar(&cfg.MemoryLimit, "memory-limit", "", "also run diagnose under DuckDB's memory_limit = `SIZE` (such as 4GB), beside the run with DuckDB's default limit; the data generator keeps to it too")
	f.BoolVar(&large, "large", false, "measure diagnose at 1,000,000 groups x 365 with DuckDB's default memory limit and under --memory-limit (default 4GB); needs 3 GB of disk for the file and about 12 GB of memory for the unlimited run")
	f.BoolVar(&generate, "generate", false, "only generate the data file and print its path (used by bench itself)")
	f.MarkHidden("generate")
	f.MarkHidden("phase")
	f.MarkHidden("file")
	return cmd
}
