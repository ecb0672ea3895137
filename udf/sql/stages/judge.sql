{{define "judge_group"}}SELECT {{.By}}, n, first_at, last_at, plumb_d,
                   CASE WHEN plumb_d.shift_point IS NOT NULL THEN plumb_points[plumb_d.shift_point + 1].t END AS plumb_shift_at
            FROM (SELECT {{.By}}, plumb_points, plumb_rows AS n, plumb_first_at AS first_at, plumb_last_at AS last_at,
                         plumb_diagnose(plumb_points, {{.Period}}, {{.Alpha}}, {{.Fill}}) AS plumb_d
                  FROM plumb_series){{end}}{{define "judged"}}, plumb_judged AS (
    SELECT {{.By}}, n, first_at, last_at, {{join .Picks ", "}}
    FROM plumb_done
){{end}}
