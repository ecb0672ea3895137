WITH RECURSIVE plumb_source_ok AS MATERIALIZED (
    SELECT CASE WHEN plumb_problem IS NULL THEN true ELSE error(plumb_problem) END AS plumb_ok
    FROM (SELECT plumb_columns_problem('', '', ['store', 'day', 'units']::VARCHAR[], ['by', 'at', 'value']::VARCHAR[], 'units',
                                       list(column_name), list(column_type), (SELECT count(*) > 0 FROM (SELECT 1 FROM 'sales.parquet' LIMIT 1))) AS plumb_problem
          FROM (DESCRIBE SELECT * FROM 'sales.parquet'))
), plumb_input AS NOT MATERIALIZED (
    SELECT "store", "day", "units"
    FROM (SELECT *, NULL AS "store", NULL AS "day", NULL AS "units" FROM 'sales.parquet')
), plumb_keys AS MATERIALIZED (
    SELECT "store", count(*) AS plumb_rows, ("store" IS NULL) AS plumb_null_key
    FROM plumb_input
    WHERE (SELECT plumb_ok FROM plumb_source_ok)
    GROUP BY "store"
    HAVING plumb_shard([CAST("store" AS VARCHAR)], 4) = 1
), plumb_plan AS MATERIALIZED (
    SELECT "store", plumb_rows, plumb_null_key, dense_rank() OVER (ORDER BY plumb_start // plumb_batch_rows) - 1 AS plumb_batch
    FROM (
        SELECT *, sum(plumb_rows) OVER (ORDER BY "store" ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) - plumb_rows AS plumb_start
        FROM plumb_keys
    ), (
        SELECT CASE WHEN getvariable('plumb_batch_rows') IS NULL
                    THEN plumb_batch_rows(current_setting('memory_limit'), current_setting('threads')::BIGINT,
                                          count(*), sum(plumb_rows)::BIGINT, 64, 24)
                    ELSE greatest(getvariable('plumb_batch_rows')::BIGINT, 1) END AS plumb_batch_rows
        FROM plumb_keys
    )
), plumb_batches AS (
    SELECT -1::BIGINT AS plumb_batch, (SELECT count(DISTINCT plumb_batch) FROM plumb_plan) AS plumb_batch_count,
           true AS plumb_marker, plumb_out AS plumb_row
    FROM (
        WITH plumb_groups AS (
    SELECT "store",
           count(*) AS plumb_rows,
           max(plumb_counted) AS plumb_counted,
           count("day") AS plumb_at_present,
           min("day") AS plumb_first_at,
           max("day") AS plumb_last_at,
           list(struct_pack(t := "day", v := "units"::DOUBLE)) AS plumb_points
    FROM (SELECT *, NULL::BIGINT AS plumb_counted FROM plumb_input LIMIT 0)
    GROUP BY "store"
), plumb_no_series AS (
    SELECT "store", plumb_rows, plumb_first_at, plumb_last_at,
           CASE
               WHEN plumb_rows <> plumb_counted THEN error(': ' || 'the source gave group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL')) || ' ' || plumb_counted || ' rows on one read and ' || plumb_rows || ' on another; '
               || '' || ' reads its source more than once (to count each group''s rows, then once per batch of groups), so the source must give the same rows '
               || 'on every read (no sampling, no LIMIT without ORDER BY); store it in a table first')
               WHEN plumb_at_present < plumb_rows THEN error(': ' || 'column ' || '"day"' || ' is NULL in ' || (plumb_rows - plumb_at_present) || ' rows of group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL')))
               ELSE plumb_points
           END AS plumb_points
    FROM plumb_groups
), plumb_series AS (
            SELECT plumb_no_series.* FROM (SELECT 1) AS plumb_one(plumb_x) LEFT JOIN plumb_no_series ON false
        )
        SELECT * FROM (
            SELECT "store", n, first_at, last_at, plumb_d,
                   CASE WHEN plumb_d.shift_point IS NOT NULL THEN plumb_points[plumb_d.shift_point + 1].t END AS plumb_shift_at
            FROM (SELECT "store", plumb_points, plumb_rows AS n, plumb_first_at AS first_at, plumb_last_at AS last_at,
                         plumb_diagnose(plumb_points, 7, 0.05::DOUBLE, 'linear') AS plumb_d
                  FROM plumb_series)
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
            FROM plumb_input JOIN (FROM plumb_batch_keys WHERE NOT plumb_null_key) AS plumb_k ON plumb_input."store" = plumb_k."store"
            UNION ALL
            SELECT plumb_input.*, plumb_k.plumb_rows AS plumb_counted
            FROM plumb_input JOIN (FROM plumb_batch_keys WHERE plumb_null_key) AS plumb_k ON plumb_input."store" IS NOT DISTINCT FROM plumb_k."store"
        ), plumb_groups AS (
    SELECT "store",
           count(*) AS plumb_rows,
           max(plumb_counted) AS plumb_counted,
           count("day") AS plumb_at_present,
           min("day") AS plumb_first_at,
           max("day") AS plumb_last_at,
           list(struct_pack(t := "day", v := "units"::DOUBLE)) AS plumb_points
    FROM plumb_batch_input
    GROUP BY "store"
), plumb_series AS (
    SELECT "store", plumb_rows, plumb_first_at, plumb_last_at,
           CASE
               WHEN plumb_rows <> plumb_counted THEN error(': ' || 'the source gave group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL')) || ' ' || plumb_counted || ' rows on one read and ' || plumb_rows || ' on another; '
               || '' || ' reads its source more than once (to count each group''s rows, then once per batch of groups), so the source must give the same rows '
               || 'on every read (no sampling, no LIMIT without ORDER BY); store it in a table first')
               WHEN plumb_at_present < plumb_rows THEN error(': ' || 'column ' || '"day"' || ' is NULL in ' || (plumb_rows - plumb_at_present) || ' rows of group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL')))
               ELSE plumb_points
           END AS plumb_points
    FROM plumb_groups
), plumb_out AS MATERIALIZED (
            SELECT "store", n, first_at, last_at, plumb_d,
                   CASE WHEN plumb_d.shift_point IS NOT NULL THEN plumb_points[plumb_d.shift_point + 1].t END AS plumb_shift_at
            FROM (SELECT "store", plumb_points, plumb_rows AS n, plumb_first_at AS first_at, plumb_last_at AS last_at,
                         plumb_diagnose(plumb_points, 7, 0.05::DOUBLE, 'linear') AS plumb_d
                  FROM plumb_series)
        )
        SELECT plumb_next.plumb_batch, plumb_next.plumb_batch_count, false, plumb_out FROM plumb_out, plumb_next
        UNION ALL
        SELECT plumb_batch, plumb_batch_count, true, NULL FROM plumb_next
    )
), plumb_done AS (
    SELECT plumb_row.* FROM plumb_batches WHERE NOT plumb_marker
), plumb_judged AS (
    SELECT "store", n, first_at, last_at, CASE WHEN plumb_d.status = 'duplicate_at' THEN error(': ' || 'column ' || '"day"' || ' repeats a value in group ' || concat_ws(', ', 'store=' || coalesce("store"::VARCHAR, 'NULL')) || '; each group needs one row per time point') ELSE plumb_d.status END AS status, plumb_d.reason AS reason, plumb_d.gaps AS gaps, plumb_d.missing AS missing, plumb_d.n_used AS n_used, plumb_d.mean_stable AS mean_stable, plumb_d.spread_stable AS spread_stable, plumb_d.seasonal AS seasonal, plumb_d.stationary AS stationary, plumb_d.violations AS violations, plumb_d.mean_cause AS mean_cause, plumb_shift_at AS shift_at, plumb_d.shift_size AS shift_size, plumb_d.trend_slope AS trend_slope, plumb_d.spread_cause AS spread_cause, plumb_d.seasonal_kind AS seasonal_kind, plumb_d.second_period AS second_period, plumb_d.zero_share AS zero_share, plumb_d.demand_class AS demand_class, plumb_d.outliers AS outliers, plumb_d.differences AS differences, plumb_d.seasonal_differences AS seasonal_differences, plumb_d.box_cox_lambda AS box_cox_lambda, plumb_d.period AS period, plumb_d.seasonal_strength AS seasonal_strength, plumb_d.cured AS cured, plumb_d.left_violations AS left_violations, plumb_d.over_differenced AS over_differenced, plumb_d.score AS score, plumb_d.adf_statistic AS adf_statistic, plumb_d.adf_p_value AS adf_p_value, plumb_d.adf_lags AS adf_lags, plumb_d.kpss_statistic AS kpss_statistic, plumb_d.kpss_p_value AS kpss_p_value, plumb_d.kpss_lags AS kpss_lags, plumb_d.mean_p_value AS mean_p_value, plumb_d.spread_p_value AS spread_p_value, plumb_d.ljung_box_p_value AS ljung_box_p_value
    FROM plumb_done
)
SELECT *, 1 AS shard, 4 AS shards FROM plumb_judged ORDER BY "store"
