-- stability: see udf/stability.go.
CREATE OR REPLACE TEMP MACRO stability(series, segments := NULL) AS
    plumb_stability(series::DOUBLE[], segments::BIGINT);
