-- rolling_spread and rolling_mean: see udf/rolling.go.
CREATE OR REPLACE TEMP MACRO rolling_spread(series, width) AS
    plumb_rolling_spread(series::DOUBLE[], width::BIGINT);
CREATE OR REPLACE TEMP MACRO rolling_mean(series, width) AS
    plumb_rolling_mean(series::DOUBLE[], width::BIGINT);
