// Package bench measures plumb side by side with DuckDB's own floor and with
// the loop practitioners write today, each phase in a child process of its
// own so that its wall time and peak memory are its own.
package bench

import (
	"bytes"
	"cmp"
	"context"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/plumb-sql/plumb/udf"
)

// Config says what to measure.
type Config struct {
	Groups, Length int
	Dir            string
	// Reference is the number of groups the reference-library loop runs on
	// (0 to skip it); its time is extrapolated to all groups.
	Reference int
	// Repeats runs each phase this many times and reports the run with the
	// median wall time (0 means 1). This machine's timings drift by 10-20%
	// from run to run.
	Repeats int
	// Layout is the row order of the generated file: LayoutGroup (sorted
	// by group, then time) or LayoutTime (by time, then group: a table that
	// grows by appending each day's rows for every group).
	Layout string
	// MemoryLimit, when set, adds a diagnose phase run under DuckDB's
	// memory_limit = MemoryLimit (such as "4GB") beside the others, and
	// bounds the data generator's memory too.
	MemoryLimit string
}

// The row orders Generate can write.
const (
	LayoutGroup = "group"
	LayoutTime  = "time"
)

// Phase names a measured step.
type Phase string

const (
	PhaseFloor    Phase = "floor"     // DuckDB: list(v ORDER BY t) per group
	PhaseUnitRoot Phase = "unit_root" // plumb: ADF (AIC) and KPSS per group, the reference loop's tests
	PhaseDiagnose Phase = "diagnose"  // plumb: diagnose with default options
	PhaseForecast Phase = "forecast"  // plumb: forecast, 14 steps, default options
)

// Result is one measured phase.
type Result struct {
	Phase       string
	MemoryLimit string // DuckDB's memory_limit for the run; "" for DuckDB's default
	Wall        time.Duration
	PeakRSS     int64 // bytes
	Groups      int
	Note        string
}

// Generate writes G groups of T observations to dir/series_G_T.parquet
// (half random walks, half noise around a weekly pattern; rows in the order
// cfg.Layout names, with "_time" in the name for LayoutTime) and returns
// its path; an existing file is reused.
func Generate(ctx context.Context, cfg Config) (string, error) {
	path, order, err := dataFile(cfg)
	if err != nil {
		return "", err
	}
	if _, err := os.Stat(path); err == nil {
		return path, nil
	}
	if err := os.MkdirAll(cfg.Dir, 0o755); err != nil {
		return "", err
	}
	db, err := udf.Open(ctx, udf.Options{Settings: limitSettings(cfg.MemoryLimit)})
	if err != nil {
		return "", err
	}
	defer db.Close()
	q := fmt.Sprintf(`COPY (
		SELECT g, t,
		       CASE WHEN g %% 2 = 0
		            THEN 100 + sum(random() - 0.5) OVER (PARTITION BY g ORDER BY t)
		            ELSE 100 + 3 * sin(t * 0.8976) + (random() - 0.5) * 4 END AS v
		FROM range(%d) AS gs(g), range(%d) AS ts(t)
		ORDER BY %s
	) TO '%s' (FORMAT parquet, ROW_GROUP_SIZE 1000000)`, cfg.Groups, cfg.Length, order, strings.ReplaceAll(path, "'", "''"))
	if _, err := db.ExecContext(ctx, q); err != nil {
		return "", fmt.Errorf("generate %s: %w", path, err)
	}
	return path, nil
}

// dataFile returns the path of cfg's generated file and its ORDER BY.
func dataFile(cfg Config) (path, order string, err error) {
	switch cfg.Layout {
	case "", LayoutGroup:
		return filepath.Join(cfg.Dir, fmt.Sprintf("series_%d_%d.parquet", cfg.Groups, cfg.Length)), "g, t", nil
	case LayoutTime:
		return filepath.Join(cfg.Dir, fmt.Sprintf("series_%d_%d_time.parquet", cfg.Groups, cfg.Length)), "t, g", nil
	}
	return "", "", fmt.Errorf("unknown layout %q: use %s or %s", cfg.Layout, LayoutGroup, LayoutTime)
}

// PhaseSQL is the query each phase runs; both read every value and return
// one small row, so the client's share is nil.
func PhaseSQL(p Phase, file string) (string, error) {
	src := strings.ReplaceAll(file, "'", "''")
	switch p {
	case PhaseFloor:
		return fmt.Sprintf(`SELECT count(*), sum(len(l)) FROM (SELECT g, list(v ORDER BY t) AS l FROM '%s' GROUP BY g)`, src), nil
	case PhaseUnitRoot:
		return fmt.Sprintf(`SELECT count(*), count(a) + count(k) FROM (
			SELECT unit_root(x).statistic AS a, unit_root(x, method := 'kpss').statistic AS k
			FROM (SELECT g, list(v ORDER BY t) AS x FROM '%s' GROUP BY g))`, src), nil
	case PhaseDiagnose:
		return fmt.Sprintf(`SELECT count(*), sum(n) FROM diagnose('%s', by := 'g', at := 't', value := 'v')`, src), nil
	case PhaseForecast:
		return fmt.Sprintf(`SELECT count(DISTINCT g), count(forecast) FROM forecast('%s', by := 'g', at := 't', value := 'v')`, src), nil
	}
	return "", fmt.Errorf("unknown phase %q", p)
}

// limitSettings are the DuckDB settings for a memory limit ("" for none).
func limitSettings(memoryLimit string) map[string]string {
	if memoryLimit == "" {
		return nil
	}
	return map[string]string{"memory_limit": memoryLimit}
}

// RunPhase runs one phase in this process, under DuckDB's memory_limit =
// memoryLimit unless it is empty, and prints "groups values".
func RunPhase(ctx context.Context, p Phase, file, memoryLimit string, w io.Writer) error {
	q, err := PhaseSQL(p, file)
	if err != nil {
		return err
	}
	db, err := udf.Open(ctx, udf.Options{Settings: limitSettings(memoryLimit)})
	if err != nil {
		return err
	}
	defer db.Close()
	var groups, values int64
	if err := db.QueryRowContext(ctx, q).Scan(&groups, &values); err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%d %d\n", groups, values)
	return err
}

// Measure runs argv as a child process and returns its wall time, peak
// resident memory and standard output.
func Measure(ctx context.Context, argv []string) (time.Duration, int64, string, error) {
	cmd := exec.CommandContext(ctx, argv[0], argv[1:]...)
	var out, errOut bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errOut
	start := time.Now()
	err := cmd.Run()
	wall := time.Since(start)
	if err != nil {
		return wall, 0, "", fmt.Errorf("%s: %w: %s", strings.Join(argv, " "), err, strings.TrimSpace(errOut.String()))
	}
	var rss int64
	if u, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
		rss = u.Maxrss * 1024 // Linux reports kilobytes
	}
	return wall, rss, out.String(), nil
}

// Run measures the phases for cfg with the plumb binary self and writes a
// table to w. The data is generated in a child process too: Linux carries a
// process's peak RSS over to the children it forks, so the parent must stay
// small for the children's peaks to be their own.
func Run(ctx context.Context, cfg Config, self string, w io.Writer) ([]Result, error) {
	return RunPhases(ctx, cfg, self, []Phase{PhaseFloor, PhaseUnitRoot, PhaseDiagnose, PhaseForecast}, w)
}

// RunPhases is Run with a choice of phases (the first is the one the others
// are compared with). With cfg.MemoryLimit set, diagnose runs a second time
// under that limit (Result.MemoryLimit).
func RunPhases(ctx context.Context, cfg Config, self string, phases []Phase, w io.Writer) ([]Result, error) {
	gen := []string{self, "bench", "--generate", "--groups", strconv.Itoa(cfg.Groups),
		"--length", strconv.Itoa(cfg.Length), "--dir", cfg.Dir, "--layout", cfg.Layout}
	if cfg.MemoryLimit != "" {
		gen = append(gen, "--memory-limit", cfg.MemoryLimit)
	}
	_, _, out, err := Measure(ctx, gen)
	if err != nil {
		return nil, err
	}
	file := strings.TrimSpace(out)
	type run struct {
		phase Phase
		limit string
	}
	var runs []run
	for _, p := range phases {
		runs = append(runs, run{p, ""})
		if p == PhaseDiagnose && cfg.MemoryLimit != "" {
			runs = append(runs, run{p, cfg.MemoryLimit})
		}
	}
	var results []Result
	repeats := max(cfg.Repeats, 1)
	for _, r := range runs {
		argv := []string{self, "bench", "--phase", string(r.phase), "--file", file}
		if r.limit != "" {
			argv = append(argv, "--memory-limit", r.limit)
		}
		var times []Result
		for range repeats {
			wall, rss, out, err := Measure(ctx, argv)
			if err != nil {
				return nil, err
			}
			groups, _ := strconv.Atoi(strings.Fields(out + " 0")[0])
			times = append(times, Result{Phase: string(r.phase), MemoryLimit: r.limit, Wall: wall, PeakRSS: rss, Groups: groups})
		}
		slices.SortFunc(times, func(a, b Result) int { return cmp.Compare(a.Wall, b.Wall) })
		median := times[len(times)/2]
		if repeats > 1 {
			median.Note = fmt.Sprintf("(median of %d runs: %.2f-%.2f s)", repeats, times[0].Wall.Seconds(), times[len(times)-1].Wall.Seconds())
		}
		results = append(results, median)
	}
	if cfg.Reference > 0 {
		r, err := referenceLoop(ctx, cfg, file)
		if err != nil {
			fmt.Fprintf(w, "reference loop skipped: %v\n", err)
		} else {
			results = append(results, r)
		}
	}
	writeTable(w, cfg, results)
	return results, nil
}

func writeTable(w io.Writer, cfg Config, results []Result) {
	layout := cfg.Layout
	if layout == "" {
		layout = LayoutGroup
	}
	fmt.Fprintf(w, "%d groups x %d observations, rows ordered by %s\n", cfg.Groups, cfg.Length, layout)
	fmt.Fprintf(w, "%-34s %10s %12s %12s %10s\n", "phase", "wall (s)", "groups/s", "peak RSS MB", "vs floor")
	floor := results[0].Wall
	for _, r := range results {
		name := r.Phase
		if r.MemoryLimit != "" {
			name += " (memory_limit " + r.MemoryLimit + ")"
		}
		fmt.Fprintf(w, "%-34s %10.2f %12.0f %12.0f %9.2fx %s\n", name, r.Wall.Seconds(),
			float64(cfg.Groups)/r.Wall.Seconds(), float64(r.PeakRSS)/(1<<20), r.Wall.Seconds()/floor.Seconds(), r.Note)
	}
}
