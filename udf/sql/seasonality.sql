-- seasonality: see udf/seasonality.go.
CREATE OR REPLACE TEMP MACRO seasonality(series, period := NULL) AS
    plumb_seasonality(series::DOUBLE[], period::BIGINT);
