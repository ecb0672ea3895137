WITH RECURSIVE {{.Plan}}, plumb_batches AS (
    SELECT -1::BIGINT AS plumb_batch, (SELECT count(DISTINCT plumb_batch) FROM plumb_plan) AS plumb_batch_count,
           true AS plumb_marker, plumb_out AS plumb_row
    FROM (
        WITH {{.NoSeries}}, plumb_series AS (
            SELECT plumb_no_series.* FROM (SELECT 1) AS plumb_one(plumb_x) LEFT JOIN plumb_no_series ON false
        )
        SELECT * FROM (
            {{.PerGroup}}
        ) LIMIT 1
    ) AS plumb_out
    UNION ALL (
        WITH plumb_next AS (
            SELECT DISTINCT plumb_batch + 1 AS plumb_batch, plumb_batch_count
            FROM plumb_batches
            WHERE plumb_marker AND plumb_batch + 1 < plumb_batch_count
        ), plumb_batch_keys AS (
            SELECT plumb_plan.* FROM plumb_plan JOIN plumb_next USING (plumb_batch)
        ), plumb_batch_input AS (
            SELECT plumb_input.*, plumb_k.plumb_rows AS plumb_counted
            FROM plumb_input JOIN (FROM plumb_batch_keys WHERE NOT plumb_null_key) AS plumb_k ON {{.KeysEqual}}
            UNION ALL
            SELECT plumb_input.*, plumb_k.plumb_rows AS plumb_counted
            FROM plumb_input JOIN (FROM plumb_batch_keys WHERE plumb_null_key) AS plumb_k ON {{.KeysSame}}
        ), {{.Series}}, plumb_out AS MATERIALIZED (
            {{.PerGroup}}
        )
        SELECT plumb_next.plumb_batch, plumb_next.plumb_batch_count, false, plumb_out FROM plumb_out, plumb_next
        UNION ALL
        SELECT plumb_batch, plumb_batch_count, true, NULL FROM plumb_next
    )
), plumb_done AS (
    SELECT plumb_row.* FROM plumb_batches WHERE NOT plumb_marker
)
