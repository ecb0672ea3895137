-- Differencing undone: undifference(difference(x)) anchored on the first value gives back every shop series exactly
SELECT count(*) AS series,
       count(*) FILTER (WHERE list_concat(series[1:1], undifference(difference(series), series[1:1])) = series)
           AS restored_exactly,
       count(*) FILTER (WHERE list_concat(series[1:7], undifference(difference(series, lag := 7), series[1:7], lag := 7)) = series)
           AS restored_exactly_weekly
FROM (SELECT list(units ORDER BY day)::DOUBLE[] AS series FROM shops GROUP BY shop, product);
