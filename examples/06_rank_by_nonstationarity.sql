-- The shop series furthest from stationary: diagnose ranks every group, with q-values that control false discoveries across all 96
SELECT rank, shop, product, violations,
       differences AS d, seasonal_differences AS "D", round(box_cox_lambda, 2) AS lambda,
       round(score, 1) AS score,
       round(kpss_q_value, 3) AS kpss_q, round(mean_q_value, 4) AS mean_q, round(spread_q_value, 4) AS spread_q
FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'units', period := 7)
ORDER BY rank
LIMIT 10;
