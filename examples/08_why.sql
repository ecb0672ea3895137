-- Why: the verdict in words for one shop series of each planted behaviour
WITH ranked AS (
    SELECT d.*, t.kind, row_number() OVER (PARTITION BY t.kind ORDER BY d.rank) AS nth
    FROM diagnose('shops', by := ['shop', 'product'], at := 'day', value := 'units', period := 7) AS d
    JOIN shops_truth AS t USING (shop, product)
)
SELECT kind, shop, product, reason
FROM ranked
WHERE nth = 1
ORDER BY kind;
