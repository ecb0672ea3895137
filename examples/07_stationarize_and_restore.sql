-- Stationarize every container by its own recipe, store the recipes, forecast the mean on the stationary scale, and bring it back to degrees
CREATE OR REPLACE TEMP TABLE container_recipes AS
    FROM stationarize_recipes('containers', by := 'container', at := 'hour', value := 'temperature', period := 24);

CREATE OR REPLACE TEMP TABLE container_forecasts AS
    WITH stationary AS (
        FROM stationarize('containers', by := 'container', at := 'hour', value := 'temperature', period := 24)
    )
    SELECT s.container, r.last_at + INTERVAL (h) HOUR AS hour, avg(s.stationary_value) AS temperature
    FROM stationary AS s JOIN container_recipes AS r USING (container), range(1, 4) AS steps(h)
    GROUP BY s.container, r.last_at, h;

SELECT r.container, r.differences AS d, r.seasonal_differences AS "D",
       (SELECT round(temperature, 2) FROM containers c WHERE c.container = r.container AND c.hour = r.last_at) AS last_reading,
       list(round(f.temperature, 2) ORDER BY f.hour) AS next_three_hours
FROM restore('container_forecasts', 'container_recipes', by := 'container', at := 'hour', value := 'temperature') AS f
JOIN container_recipes AS r USING (container)
GROUP BY ALL
ORDER BY r.container
LIMIT 6;
