// Package defaults is the one table of plumb's option defaults.
//
// Every default a user meets is written here once: the SQL macros take
// theirs from [SQL] (their .sql templates say {{.alpha}}, never 0.05), the
// command-line flags and diagnosis.Spec take the typed constants, and the
// stats options, whose zero value means "the default", read the same
// constants. The package is pure Go and imports nothing of plumb, so stats,
// udf and cmd can all import it; it sits under stats, the bottom of the
// import graph, as the top level of the repository is fixed.
package defaults

import (
	"strconv"
	"strings"
)

// The defaults, by the option name plumb's SQL functions and flags use.
const (
	// Alpha is the level of the verdict's decisions (stationarity,
	// diagnose, stationarize, forecast; --alpha).
	Alpha = 0.05
	// Fill is how gaps and missing values are treated: "none" reports them.
	Fill = "none"
	// Horizon is how many steps forecast looks ahead.
	Horizon = 14
	// Coverage is the nominal coverage of forecast's central interval.
	Coverage = 0.95
	// Holdout is how many of a series' last values forecast holds back to
	// score itself: 0, none.
	Holdout = 0
	// Point is which centre of the forecast distribution forecast gives in
	// original units after a Box-Cox transform: the median.
	Point = "median"
	// WhiteNoiseLags is the number of autocorrelations white_noise sums.
	WhiteNoiseLags = 10
	// WhiteNoiseFitted is the number of fitted parameters white_noise takes
	// off the degrees of freedom.
	WhiteNoiseFitted = 0
	// UnitRootMethod is the test unit_root runs.
	UnitRootMethod = "adf"
	// Deterministic is the deterministic part of unit_root's regression.
	Deterministic = "level"
	// LagRule is how unit_root and zivot_andrews choose their lags.
	LagRule = "aic"
	// BreakKind is what breaks in zivot_andrews' alternative.
	BreakKind = "level"
	// Trimming is the share of each end of the series zivot_andrews does
	// not search for a break.
	Trimming = 0.15
	// RollingWidth is rolling_dispersion's window.
	RollingWidth = 30
	// DifferenceLag and DifferenceTimes are difference's lag and order.
	DifferenceLag   = 1
	DifferenceTimes = 1
	// Anchor is where restore starts a series: 'last' for forecasts.
	Anchor = "last"
)

// Periods are the seasonal periods tried when none is given (period :=
// NULL, --period 0): a week of days, a year of months, a day of hours, a
// year of weeks, a year of days.
func Periods() []int { return []int{7, 12, 24, 52, 365} }

// Default is one row of the table: an option's name as SQL spells it and
// its default as an SQL literal.
type Default struct {
	Name string
	SQL  string
}

// Table lists every default with its SQL literal, in the order above. The
// macro templates are rendered with it (see SQL).
var Table = []Default{
	{"alpha", float(Alpha)},
	{"fill", text(Fill)},
	{"horizon", strconv.Itoa(Horizon)},
	{"coverage", float(Coverage)},
	{"holdout", strconv.Itoa(Holdout)},
	{"point", text(Point)},
	{"white_noise_lags", strconv.Itoa(WhiteNoiseLags)},
	{"white_noise_fitted", strconv.Itoa(WhiteNoiseFitted)},
	{"method", text(UnitRootMethod)},
	{"deterministic", text(Deterministic)},
	{"lag_rule", text(LagRule)},
	{"kind", text(BreakKind)},
	{"trimming", float(Trimming)},
	{"width", strconv.Itoa(RollingWidth)},
	{"lag", strconv.Itoa(DifferenceLag)},
	{"times", strconv.Itoa(DifferenceTimes)},
	{"anchor", text(Anchor)},
}

// SQL returns the table as a map from option name to SQL literal, the data
// the macro templates are rendered with.
func SQL() map[string]string {
	m := make(map[string]string, len(Table))
	for _, d := range Table {
		m[d.Name] = d.SQL
	}
	return m
}

// PeriodList is Periods as text, "7, 12, 24, 52, 365", for help texts.
func PeriodList() string {
	p := Periods()
	s := make([]string, len(p))
	for i, v := range p {
		s[i] = strconv.Itoa(v)
	}
	return strings.Join(s, ", ")
}

func float(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func text(s string) string { return "'" + strings.ReplaceAll(s, "'", "''") + "'" }
