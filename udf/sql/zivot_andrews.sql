-- zivot_andrews: see udf/zivot_andrews.go.
CREATE OR REPLACE TEMP MACRO zivot_andrews(series, kind := {{.kind}}, lags := NULL, lag_rule := {{.lag_rule}}, trimming := {{.trimming}}) AS
    plumb_zivot_andrews(series::DOUBLE[], kind, lags::BIGINT, lag_rule, trimming::DOUBLE);
