WITH RECURSIVE plumb_source_ok AS MATERIALIZED (
    SELECT CASE WHEN plumb_problem IS NULL THEN true ELSE error(plumb_problem) END AS plumb_ok
    FROM (SELECT plumb_columns_problem('', '', ['store', 'sku', 'day', 'units']::VARCHAR[], ['by', 'by', 'at', 'value']::VARCHAR[], 'units',
                                       list(column_name), list(column_type), (SELECT count(*) > 0 FROM (SELECT 1 FROM 'sales.parquet' LIMIT 1))) AS plumb_problem
          FROM (DESCRIBE SELECT * FROM 'sales.parquet'))
), plumb_input AS NOT MATERIALIZED (
    SELECT "store", "sku", "day", "units"
    FROM (SELECT *, NULL AS "store", NULL AS "sku", NULL AS "day", NULL AS "units" FROM 'sales.parquet')
), plumb_keys AS MATERIALIZED (
    SELECT "store", "sku", count(*) AS plumb_rows, ("store" IS NULL OR "sku" IS NULL) AS plumb_null_key
    FROM plumb_input
    WHERE (SELECT plumb_ok FROM plumb_source_ok)
    GROUP BY "store", "sku"
), plumb_plan AS MATERIALIZED (
    SELECT "store", "sku", plumb_rows, plumb_null_key, dense_rank() OVER (ORDER BY plumb_start // plumb_batch_rows) - 1 AS plumb_batch
    FROM (
        SELECT *, sum(plumb_rows) OVER (ORDER BY "store", "sku" ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) - plumb_rows AS plumb_start
        FROM plumb_keys
    ), (
        SELECT CASE WHEN getvariable('plumb_batch_rows') IS NULL
                    THEN plumb_batch_rows(current_setting('memory_limit'), current_setting('threads')::BIGINT,
                                          count(*), sum(plumb_rows)::BIGINT, 64, 48)
                    ELSE greatest(getvariable('plumb_batch_rows')::BIGINT, 1) END AS plumb_batch_rows
        FROM plumb_keys
    )
), plumb_batches AS (
    SELECT -1::BIGINT AS plumb_batch, (SELECT count(DISTINCT plumb_batch) FROM plumb_plan) AS plumb_batch_count,
           true AS plumb_marker, plumb_out AS plumb_row
    FROM (
        WITH plumb_pairs AS (
    SELECT "store", "sku",
           count(*) AS plumb_rows,
           max(plumb_counted) AS plumb_counted,
           count("day") AS plumb_at_present,
           list_sort(list(struct_pack(t := "day", v := "units"))) AS plumb_sorted
    FROM (SELECT *, NULL::BIGINT AS plumb_counted FROM plumb_input LIMIT 0)
    GROUP BY "store", "sku"
), plumb_groups AS (
    SELECT "store", "sku", plumb_rows, plumb_counted, plumb_at_present,
           [p.t FOR p IN plumb_sorted] AS plumb_at,
           [p.v FOR p IN plumb_sorted] AS plumb_raw
    FROM plumb_pairs
), plumb_no_series AS (
    SELECT "store", "sku", plumb_rows, plumb_at, plumb_raw,
           CASE
               WHEN plumb_rows <> plumb_counted THEN error(': ' || 'the source gave group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL'), 'sku=' || coalesce("sku"::VARCHAR, 'NULL')) || ' ' || plumb_counted || ' rows on one read and ' || plumb_rows || ' on another; '
               || '' || ' reads its source more than once (to count each group''s rows, then once per batch of groups), so the source must give the same rows '
               || 'on every read (no sampling, no LIMIT without ORDER BY); store it in a table first')
               WHEN plumb_at_present < plumb_rows THEN error(': ' || 'column ' || '"day"' || ' is NULL in ' || (plumb_rows - plumb_at_present) || ' rows of group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL'), 'sku=' || coalesce("sku"::VARCHAR, 'NULL')))
               WHEN plumb_repeats(plumb_at) > 0 THEN
                   error(': ' || 'column ' || '"day"' || ' repeats a value in group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL'), 'sku=' || coalesce("sku"::VARCHAR, 'NULL')) || ' (' || plumb_repeats(plumb_at) || ' duplicates); each group needs one row per time point')
               ELSE plumb_raw::DOUBLE[]
           END AS plumb_value
    FROM plumb_groups
), plumb_series AS (
            SELECT plumb_no_series.* FROM (SELECT 1) AS plumb_one(plumb_x) LEFT JOIN plumb_no_series ON false
        )
        SELECT * FROM (
            SELECT "store", "sku", len(plumb_at) AS n, plumb_at[len(plumb_at)] AS last_at,
                   list_mode([plumb_at[i + 1] - plumb_at[i] FOR i IN range(1, len(plumb_at))]) AS step,
                   plumb_s.status AS status,
                   plumb_s.box_cox_lambda AS box_cox_lambda, plumb_s.period AS period,
                   plumb_s.seasonal_means AS seasonal_means, plumb_s.seasonal_differences AS seasonal_differences,
                   plumb_s.trend_intercept AS trend_intercept, plumb_s.trend_slope AS trend_slope,
                   plumb_s.shift_position AS shift_position, plumb_at[plumb_s.shift_position] AS shift_at,
                   plumb_s.shift_size AS shift_size,
                   plumb_s.differences AS differences, plumb_s.head AS head, plumb_s.tail AS tail
            FROM (SELECT *, plumb_stationarize(plumb_value, NULL, 0.05::DOUBLE) AS plumb_s FROM plumb_series)
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
            FROM plumb_input JOIN (FROM plumb_batch_keys WHERE NOT plumb_null_key) AS plumb_k ON plumb_input."store" = plumb_k."store" AND plumb_input."sku" = plumb_k."sku"
            UNION ALL
            SELECT plumb_input.*, plumb_k.plumb_rows AS plumb_counted
            FROM plumb_input JOIN (FROM plumb_batch_keys WHERE plumb_null_key) AS plumb_k ON plumb_input."store" IS NOT DISTINCT FROM plumb_k."store" AND plumb_input."sku" IS NOT DISTINCT FROM plumb_k."sku"
        ), plumb_pairs AS (
    SELECT "store", "sku",
           count(*) AS plumb_rows,
           max(plumb_counted) AS plumb_counted,
           count("day") AS plumb_at_present,
           list_sort(list(struct_pack(t := "day", v := "units"))) AS plumb_sorted
    FROM plumb_batch_input
    GROUP BY "store", "sku"
), plumb_groups AS (
    SELECT "store", "sku", plumb_rows, plumb_counted, plumb_at_present,
           [p.t FOR p IN plumb_sorted] AS plumb_at,
           [p.v FOR p IN plumb_sorted] AS plumb_raw
    FROM plumb_pairs
), plumb_series AS (
    SELECT "store", "sku", plumb_rows, plumb_at, plumb_raw,
           CASE
               WHEN plumb_rows <> plumb_counted THEN error(': ' || 'the source gave group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL'), 'sku=' || coalesce("sku"::VARCHAR, 'NULL')) || ' ' || plumb_counted || ' rows on one read and ' || plumb_rows || ' on another; '
               || '' || ' reads its source more than once (to count each group''s rows, then once per batch of groups), so the source must give the same rows '
               || 'on every read (no sampling, no LIMIT without ORDER BY); store it in a table first')
               WHEN plumb_at_present < plumb_rows THEN error(': ' || 'column ' || '"day"' || ' is NULL in ' || (plumb_rows - plumb_at_present) || ' rows of group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL'), 'sku=' || coalesce("sku"::VARCHAR, 'NULL')))
               WHEN plumb_repeats(plumb_at) > 0 THEN
                   error(': ' || 'column ' || '"day"' || ' repeats a value in group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL'), 'sku=' || coalesce("sku"::VARCHAR, 'NULL')) || ' (' || plumb_repeats(plumb_at) || ' duplicates); each group needs one row per time point')
               ELSE plumb_raw::DOUBLE[]
           END AS plumb_value
    FROM plumb_groups
), plumb_out AS MATERIALIZED (
            SELECT "store", "sku", len(plumb_at) AS n, plumb_at[len(plumb_at)] AS last_at,
                   list_mode([plumb_at[i + 1] - plumb_at[i] FOR i IN range(1, len(plumb_at))]) AS step,
                   plumb_s.status AS status,
                   plumb_s.box_cox_lambda AS box_cox_lambda, plumb_s.period AS period,
                   plumb_s.seasonal_means AS seasonal_means, plumb_s.seasonal_differences AS seasonal_differences,
                   plumb_s.trend_intercept AS trend_intercept, plumb_s.trend_slope AS trend_slope,
                   plumb_s.shift_position AS shift_position, plumb_at[plumb_s.shift_position] AS shift_at,
                   plumb_s.shift_size AS shift_size,
                   plumb_s.differences AS differences, plumb_s.head AS head, plumb_s.tail AS tail
            FROM (SELECT *, plumb_stationarize(plumb_value, NULL, 0.05::DOUBLE) AS plumb_s FROM plumb_series)
        )
        SELECT plumb_next.plumb_batch, plumb_next.plumb_batch_count, false, plumb_out FROM plumb_out, plumb_next
        UNION ALL
        SELECT plumb_batch, plumb_batch_count, true, NULL FROM plumb_next
    )
), plumb_done AS (
    SELECT plumb_row.* FROM plumb_batches WHERE NOT plumb_marker
)
FROM plumb_done
