{{.Input}}, plumb_keys AS MATERIALIZED (
    SELECT {{.By}}, count(*) AS plumb_rows, ({{.NullKey}}) AS plumb_null_key
    FROM plumb_input
    WHERE (SELECT plumb_ok FROM plumb_source_ok)
    GROUP BY {{.By}}{{.ShardFilter}}
), plumb_plan AS MATERIALIZED (
    SELECT {{.By}}, plumb_rows, plumb_null_key, dense_rank() OVER (ORDER BY plumb_start // plumb_batch_rows) - 1 AS plumb_batch
    FROM (
        SELECT *, sum(plumb_rows) OVER (ORDER BY {{.By}} ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) - plumb_rows AS plumb_start
        FROM plumb_keys
    ), (
        SELECT CASE WHEN getvariable('plumb_batch_rows') IS NULL
                    THEN plumb_batch_rows(current_setting('memory_limit'), current_setting('threads')::BIGINT,
                                          count(*), sum(plumb_rows)::BIGINT, {{.BytesPerRow}}, {{.ChunkBytes}})
                    ELSE greatest(getvariable('plumb_batch_rows')::BIGINT, 1) END AS plumb_batch_rows
        FROM plumb_keys
    )
)
