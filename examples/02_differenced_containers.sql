-- Every container differenced hour on hour: rows kept, rows with a difference, and the mean hourly change
SELECT container,
       count(*)                             AS hours,
       count(differenced_value)             AS differenced_hours,
       round(avg(differenced_value), 5)     AS mean_change,
       round(stddev(temperature), 3)        AS spread_before,
       round(stddev(differenced_value), 3)  AS spread_after
FROM differenced('containers', by := 'container', at := 'hour', value := 'temperature')
GROUP BY container
ORDER BY container
LIMIT 6;
