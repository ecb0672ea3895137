-- The shop series furthest from stationary: diagnose ranks every group by its score, with q-values that control false discoveries across all 96
SELECT rank, shop, product, violations, mean_cause, spread_cause, seasonal_kind,
       differences AS d, seasonal_differences AS "D", round(box_cox_lambda, 2) AS lambda,
       cured, round(score, 3) AS score,
       round(kpss_q_value, 3) AS kpss_q, round(mean_q_value, 4) AS mean_q
FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'units', period := 7)
ORDER BY rank
LIMIT 10;
