-- The verdict on every shop and container series against what was planted: which condition breaks, why, and whether the recipe cures it
WITH judged AS (
    SELECT 'shops' AS dataset, t.kind, stationarity(list(s.units ORDER BY s.day), period := 7) AS v
    FROM shops AS s JOIN shops_truth AS t USING (shop, product)
    GROUP BY t.kind, s.shop, s.product
    UNION ALL
    SELECT 'containers', t.kind, stationarity(list(c.temperature ORDER BY c.hour), period := 24)
    FROM containers AS c JOIN containers_truth AS t USING (container)
    GROUP BY t.kind, c.container
)
SELECT kind,
       count(*)                                                 AS series,
       count(*) FILTER (WHERE v.stationary)                     AS stationary,
       count(*) FILTER (WHERE v.mean_cause = 'unit_root')       AS unit_root,
       count(*) FILTER (WHERE v.mean_cause = 'trend')           AS trend,
       count(*) FILTER (WHERE v.mean_cause = 'level_shift')     AS level_shift,
       count(*) FILTER (WHERE v.spread_cause = 'level')         AS spread_with_level,
       count(*) FILTER (WHERE v.spread_cause = 'time')          AS spread_over_time,
       count(*) FILTER (WHERE v.seasonal_kind = 'fixed')        AS fixed_season,
       count(*) FILTER (WHERE v.seasonal_kind = 'drifting')     AS drifting_season,
       count(*) FILTER (WHERE v.cured)                          AS cured,
       round(avg(v.score), 2)                                   AS mean_score
FROM judged
GROUP BY kind
ORDER BY mean_score DESC;
