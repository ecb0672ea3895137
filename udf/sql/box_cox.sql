-- box_cox, inverse_box_cox and box_cox_lambda: see udf/box_cox.go.
-- The exponent is λ; lambda is a reserved word in DuckDB's SQL.
CREATE OR REPLACE TEMP MACRO box_cox(series, exponent) AS
    plumb_box_cox(series::DOUBLE[], exponent::DOUBLE);
CREATE OR REPLACE TEMP MACRO inverse_box_cox(series, exponent) AS
    plumb_inverse_box_cox(series::DOUBLE[], exponent::DOUBLE);
CREATE OR REPLACE TEMP MACRO box_cox_lambda(series, period := NULL) AS
    plumb_box_cox_lambda(series::DOUBLE[], period::BIGINT);
