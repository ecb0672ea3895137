-- mean_break: see udf/mean_break.go.
CREATE OR REPLACE TEMP MACRO mean_break(series) AS
    plumb_mean_break(series::DOUBLE[]);
