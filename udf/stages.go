package udf

import (
	"embed"
	"strings"
	"text/template"
)

// The generated SQL of the table functions, one template a stage, in
// udf/sql/stages: plan.sql plans the batches (the keys counted and cut into
// runs that fit memory_limit), batches.sql gathers each batch's points and
// runs the function's per-group work in a recursive CTE, judge.sql is
// diagnose's per-group work and the columns it takes from the verdict
// (templates judge_group and judged), rank.sql adds the
// q-values and the rank of diagnose and combine_diagnoses. The builders in
// batches.go and diagnose.go compute the pieces (quoted identifiers, the
// per-group SELECT) and render these; TestGeneratedSQLGolden pins the result.

//go:embed sql/stages/*.sql
var stageFiles embed.FS

var stages = template.Must(template.New("stages").Option("missingkey=error").
	Funcs(template.FuncMap{"join": strings.Join}).ParseFS(stageFiles, "sql/stages/*.sql"))

// renderStage renders the stage template name (a file of sql/stages) with
// data. The templates are fixed at build time and their data are typed
// structs, so a failure is a bug in this package; it shows as an SQL error
// naming the stage rather than as a panic.
func renderStage(name string, data any) string {
	var b strings.Builder
	if err := stages.ExecuteTemplate(&b, name, data); err != nil {
		return "SELECT error(" + quoteLiteral("udf: stage "+name+": "+err.Error()) + ")"
	}
	return strings.TrimSuffix(b.String(), "\n")
}
