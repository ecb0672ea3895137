, plumb_numbered AS MATERIALIZED (
    SELECT *, row_number() OVER () AS plumb_row FROM plumb_judged
), plumb_lists AS (
    SELECT count(*) AS plumb_count, {{range $i, $t := .Tests}}{{if $i}},
           {{end}}plumb_q_values(list({{$t}}_p_value ORDER BY plumb_row)) AS {{$t}}{{end}}
    FROM plumb_numbered
), plumb_q AS (
    SELECT unnest(range(1, plumb_count + 1)) AS plumb_row, {{range $i, $t := .Tests}}{{if $i}},
       {{end}}unnest({{$t}}) AS {{$t}}_q_value{{end}}
    FROM plumb_lists
)
SELECT * FROM (
    SELECT plumb_numbered.* EXCLUDE (plumb_row), plumb_q.* EXCLUDE (plumb_row),
           CASE WHEN score IS NOT NULL THEN rank() OVER (ORDER BY score DESC NULLS LAST) END AS rank
    FROM plumb_numbered JOIN plumb_q USING (plumb_row)
)
ORDER BY rank, {{.OrderTail}}
