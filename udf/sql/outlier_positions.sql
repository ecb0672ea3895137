-- outlier_positions: see udf/outlier_positions.go.
CREATE OR REPLACE TEMP MACRO outlier_positions(series, period := NULL) AS
    plumb_outlier_positions(series::DOUBLE[], period::BIGINT);
