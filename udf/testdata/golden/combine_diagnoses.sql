WITH plumb_parts AS NOT MATERIALIZED (
    FROM 'parts/*.parquet'
    UNION ALL BY NAME
    SELECT NULL::BIGINT AS shard, NULL::BIGINT AS shards WHERE false
), plumb_check AS (
    SELECT count(*) AS plumb_rows,
           count(*) FILTER (WHERE shard IS NULL OR shards IS NULL) AS plumb_unmarked,
           min(shards) AS plumb_min_shards, max(shards) AS plumb_max_shards,
           min(shard) AS plumb_min_shard, max(shard) AS plumb_max_shard,
           (SELECT count(*) FROM (SELECT DISTINCT COLUMNS(lambda c: c NOT IN ('n', 'first_at', 'last_at', 'status', 'reason', 'gaps', 'missing', 'n_used', 'mean_stable', 'spread_stable', 'seasonal', 'stationary', 'violations', 'mean_cause', 'shift_at', 'shift_size', 'trend_slope', 'spread_cause', 'seasonal_kind', 'second_period', 'zero_share', 'demand_class', 'outliers', 'differences', 'seasonal_differences', 'box_cox_lambda', 'period', 'seasonal_strength', 'cured', 'left_violations', 'over_differenced', 'score', 'adf_statistic', 'adf_p_value', 'adf_lags', 'kpss_statistic', 'kpss_p_value', 'kpss_lags', 'mean_p_value', 'spread_p_value', 'ljung_box_p_value', 'adf_q_value', 'kpss_q_value', 'mean_q_value', 'spread_q_value', 'ljung_box_q_value', 'rank', 'shard', 'shards')) FROM plumb_parts)) AS plumb_groups
    FROM plumb_parts
), plumb_verified AS (
    SELECT CASE
        WHEN plumb_unmarked > 0 THEN
            error('combine_diagnoses: ' || plumb_unmarked || ' rows have no shard or shards; combine the parts that diagnose(..., shard := k, shards := n) returns')
        WHEN plumb_min_shards <> plumb_max_shards THEN
            error('combine_diagnoses: the parts come from different numbers of shards (' || plumb_min_shards || ' and ' || plumb_max_shards || ')')
        WHEN plumb_min_shard < 0 OR plumb_max_shard >= plumb_max_shards THEN
            error('combine_diagnoses: a shard number lies outside 0 to ' || (plumb_max_shards - 1))
        WHEN plumb_groups < plumb_rows THEN
            error('combine_diagnoses: ' || (plumb_rows - plumb_groups) || ' groups appear more than once; is a part there twice?')
        ELSE true
    END AS plumb_ok
    FROM plumb_check
), plumb_judged AS (
    SELECT COLUMNS(lambda c: c NOT IN ('rank', 'shard', 'shards', 'plumb_ok', 'adf_q_value', 'kpss_q_value', 'mean_q_value', 'spread_q_value', 'ljung_box_q_value'))
    FROM plumb_parts, plumb_verified
    WHERE plumb_ok
), plumb_numbered AS MATERIALIZED (
    SELECT *, row_number() OVER () AS plumb_row FROM plumb_judged
), plumb_lists AS (
    SELECT count(*) AS plumb_count, plumb_q_values(list(adf_p_value ORDER BY plumb_row)) AS adf,
           plumb_q_values(list(kpss_p_value ORDER BY plumb_row)) AS kpss,
           plumb_q_values(list(mean_p_value ORDER BY plumb_row)) AS mean,
           plumb_q_values(list(spread_p_value ORDER BY plumb_row)) AS spread,
           plumb_q_values(list(ljung_box_p_value ORDER BY plumb_row)) AS ljung_box
    FROM plumb_numbered
), plumb_q AS (
    SELECT unnest(range(1, plumb_count + 1)) AS plumb_row, unnest(adf) AS adf_q_value,
       unnest(kpss) AS kpss_q_value,
       unnest(mean) AS mean_q_value,
       unnest(spread) AS spread_q_value,
       unnest(ljung_box) AS ljung_box_q_value
    FROM plumb_lists
)
SELECT * FROM (
    SELECT plumb_numbered.* EXCLUDE (plumb_row), plumb_q.* EXCLUDE (plumb_row),
           CASE WHEN score IS NOT NULL THEN rank() OVER (ORDER BY score DESC NULLS LAST) END AS rank
    FROM plumb_numbered JOIN plumb_q USING (plumb_row)
)
ORDER BY rank, COLUMNS(lambda c: c NOT IN ('n', 'first_at', 'last_at', 'status', 'reason', 'gaps', 'missing', 'n_used', 'mean_stable', 'spread_stable', 'seasonal', 'stationary', 'violations', 'mean_cause', 'shift_at', 'shift_size', 'trend_slope', 'spread_cause', 'seasonal_kind', 'second_period', 'zero_share', 'demand_class', 'outliers', 'differences', 'seasonal_differences', 'box_cox_lambda', 'period', 'seasonal_strength', 'cured', 'left_violations', 'over_differenced', 'score', 'adf_statistic', 'adf_p_value', 'adf_lags', 'kpss_statistic', 'kpss_p_value', 'kpss_lags', 'mean_p_value', 'spread_p_value', 'ljung_box_p_value', 'adf_q_value', 'kpss_q_value', 'mean_q_value', 'spread_q_value', 'ljung_box_q_value', 'rank', 'shard', 'shards'))
