-- The verdict on every shop and container series against what was planted: which condition breaks, and the recommended transform
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
       count(*) FILTER (WHERE v.stationary)                     AS judged_stationary,
       count(*) FILTER (WHERE NOT v.mean_stable)                AS mean_moves,
       count(*) FILTER (WHERE NOT v.spread_stable)              AS spread_moves,
       count(*) FILTER (WHERE v.seasonal)                       AS seasonal,
       count(*) FILTER (WHERE v.differences >= 1)               AS differenced,
       count(*) FILTER (WHERE v.seasonal_differences = 1)       AS seasonally_differenced,
       round(avg(v.score), 1)                                   AS mean_score
FROM judged
GROUP BY kind
ORDER BY mean_score DESC;
