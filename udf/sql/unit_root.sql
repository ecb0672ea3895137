-- unit_root: see udf/unit_root.go.
CREATE OR REPLACE TEMP MACRO unit_root(series, method := {{.method}}, deterministic := {{.deterministic}}, lags := NULL, lag_rule := {{.lag_rule}}) AS
    plumb_unit_root(series::DOUBLE[], method, deterministic, lags::BIGINT, lag_rule);
