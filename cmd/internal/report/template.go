package report

import "html/template"

var pageTemplate = template.Must(template.New("report").Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>{{.Title}}</title>
<style>
body { font-family: sans-serif; margin: 1.5em 2em; color: #222; }
h1 { font-size: 1.4em; } h2 { font-size: 1.15em; margin-top: 2em; } h3 { font-size: 1em; margin-bottom: 0.2em; }
.counts { display: flex; gap: 1em; flex-wrap: wrap; }
.count { border: 1px solid #ccc; border-radius: 4px; padding: 0.5em 1em; min-width: 7em; }
.count b { display: block; font-size: 1.6em; }
.count small { display: block; color: #555; }
table { border-collapse: collapse; font-size: 0.85em; }
th, td { border-bottom: 1px solid #ddd; padding: 0.25em 0.6em; text-align: right; }
td { white-space: nowrap; }
th.group, td.group, td.text { text-align: left; }
td.group, td:nth-child(6) { white-space: normal; }
td:nth-child(6) { text-align: left; }
.panel { border-top: 1px solid #ccc; margin-top: 1.5em; padding-top: 0.5em; }
.plots { display: grid; grid-template-columns: repeat(2, minmax(0, 1fr)); gap: 0.5em 1em; }
.plots svg { display: block; width: 100%; height: auto; }
@media (max-width: 50em) { .plots { grid-template-columns: minmax(0, 1fr); } }
.verdict { color: #555; margin: 0.2em 0 0.6em; }
.missing { color: #999; font-style: italic; }
.note { color: #555; font-size: 0.9em; max-width: 60em; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
<p class="note">Source: {{.Source}}. Generated {{.Generated}} by plumb. Test results are evidence for a
modelling decision, not proof; with many groups some are flagged by chance, so the q-values
(Benjamini-Hochberg) matter more than the p-values.</p>
<div class="counts">
<div class="count"><b>{{.Counts.Groups}}</b>groups</div>
<div class="count"><b>{{.Counts.Stationary}}</b>stationary</div>
<div class="count"><b>{{.Counts.Mean}}</b>mean moves<small>unit root {{.Counts.UnitRoot}}, trend {{.Counts.Trend}}, level shift {{.Counts.Shift}}</small></div>
<div class="count"><b>{{.Counts.Spread}}</b>spread moves<small>with the level {{.Counts.SpreadLevel}}, over time {{.Counts.SpreadTime}}</small></div>
<div class="count"><b>{{.Counts.Seasonal}}</b>seasonal<small>fixed {{.Counts.Fixed}}, drifting {{.Counts.Drifting}}</small></div>
<div class="count"><b>{{.Counts.Intermittent}}</b>intermittent demand</div>
<div class="count"><b>{{.Counts.Outliers}}</b>with outliers</div>
<div class="count"><b>{{.Counts.NotCured}}</b>not cured by their recipe</div>
<div class="count"><b>{{.Counts.Failed}}</b>not judged</div>
</div>
<h2>Groups furthest from stationary</h2>
<p class="note">Ranked by the score: how much of each series' variation its moving mean, its changing spread and its seasonal pattern explain, added up (0 to 3). A strong fixed weekly pattern, which subtracting its seasonal means removes, can rank above a random walk, which must be differenced: read the causes beside each rank.</p>
<table id="ranked">
<thead><tr><th>rank</th><th class="group">group</th>{{range .Columns}}<th>{{.}}</th>{{end}}</tr></thead>
<tbody>
{{range .Rows}}<tr><td>{{.Rank}}</td><td class="group">{{.Group}}</td>{{range .Cells}}<td>{{.}}</td>{{end}}</tr>
{{end}}</tbody>
</table>
<h2>The series</h2>
{{range .Panels}}<div class="panel" id="panel-{{.Rank}}">
<h3>{{.Rank}}. {{.Group}}</h3>
<p class="verdict">{{.Verdict}}</p>
<div class="plots">
<div class="plot series">{{.Series}}</div>
<div class="plot transformed">{{.Transformed}}</div>
<div class="plot acf">{{.Autocorr}}</div>
{{if .Forecast}}<div class="plot forecast">{{.Forecast}}</div>{{end}}
</div>
</div>
{{end}}
</body>
</html>
`))
