{{- /* One row per group from Input: with Points an unordered list of (t, v)
pairs, otherwise the at values in order and the values in at order. Both
check the rows counted in the first pass (Unsteady) and a NULL at (NullAt). */ -}}
{{if .Points}}plumb_groups AS (
    SELECT {{.By}},
           count(*) AS plumb_rows,
           max(plumb_counted) AS plumb_counted,
           count({{.At}}) AS plumb_at_present,
           min({{.At}}) AS plumb_first_at,
           max({{.At}}) AS plumb_last_at,
           list(struct_pack(t := {{.At}}, v := {{.Value}}::DOUBLE)) AS plumb_points
    FROM {{.Input}}
    GROUP BY {{.By}}
), {{.Name}} AS (
    SELECT {{.By}}, plumb_rows, plumb_first_at, plumb_last_at,
           CASE
               WHEN plumb_rows <> plumb_counted THEN {{.Unsteady}}
               WHEN plumb_at_present < plumb_rows THEN {{.NullAt}}
               ELSE plumb_points
           END AS plumb_points
    FROM plumb_groups
){{else}}plumb_pairs AS (
    SELECT {{.By}},
           count(*) AS plumb_rows,
           max(plumb_counted) AS plumb_counted,
           count({{.At}}) AS plumb_at_present,
           list_sort(list(struct_pack(t := {{.At}}, v := {{.Value}}))) AS plumb_sorted
    FROM {{.Input}}
    GROUP BY {{.By}}
), plumb_groups AS (
    SELECT {{.By}}, plumb_rows, plumb_counted, plumb_at_present,
           [p.t FOR p IN plumb_sorted] AS plumb_at,
           [p.v FOR p IN plumb_sorted] AS plumb_raw
    FROM plumb_pairs
), {{.Name}} AS (
    SELECT {{.By}}, plumb_rows, plumb_at, plumb_raw,
           CASE
               WHEN plumb_rows <> plumb_counted THEN {{.Unsteady}}
               WHEN plumb_at_present < plumb_rows THEN {{.NullAt}}
               WHEN plumb_repeats(plumb_at) > 0 THEN
                   error({{.Prefix}} || 'column ' || {{.AtText}} || ' repeats a value in group ' || {{.Label}} || ' (' || plumb_repeats(plumb_at) || ' duplicates); each group needs one row per time point')
               ELSE plumb_raw::DOUBLE[]
           END AS plumb_value
    FROM plumb_groups
){{end}}
