-- Unit-root evidence per planted behaviour: how often ADF rejects a unit root and KPSS rejects stationarity at 5%
WITH tested AS (
    SELECT shop, product,
           unit_root(list(units ORDER BY day))                     AS adf,
           unit_root(list(units ORDER BY day), method := 'kpss')   AS kpss
    FROM shops
    GROUP BY shop, product
)
SELECT truth.kind,
       count(*)                                              AS series,
       count(*) FILTER (WHERE adf.p_value < 0.05)            AS adf_rejects_unit_root,
       count(*) FILTER (WHERE kpss.p_value < 0.05)           AS kpss_rejects_stationarity,
       round(median(adf.statistic), 2)                       AS median_adf_statistic,
       round(median(kpss.statistic), 3)                      AS median_kpss_statistic
FROM tested JOIN shops_truth AS truth USING (shop, product)
GROUP BY truth.kind
ORDER BY truth.kind;
