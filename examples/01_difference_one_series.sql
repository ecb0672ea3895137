-- One series, differenced: Mill Lane's dairy units over its first eight days, and their day-on-day changes
SELECT shop, product,
       list(units ORDER BY day)[1:8]                AS first_eight_days,
       difference(list(units ORDER BY day))[1:7]    AS day_on_day_change,
       difference(list(units ORDER BY day), lag := 7)[1:3] AS week_on_week_change
FROM shops
WHERE shop = 'Mill Lane' AND product = 'dairy'
GROUP BY shop, product;
