-- stationarity: see udf/stationarity.go.
CREATE OR REPLACE TEMP MACRO stationarity(series, period := NULL, alpha := {{.alpha}}) AS
    plumb_stationarity(series::DOUBLE[], period::BIGINT, alpha::DOUBLE);
