-- difference and undifference: see udf/difference.go.
CREATE OR REPLACE TEMP MACRO difference(series, lag := {{.lag}}, times := {{.times}}) AS
    plumb_difference(series::DOUBLE[], lag, times);
CREATE OR REPLACE TEMP MACRO undifference(series, anchor, lag := {{.lag}}) AS
    plumb_undifference(series::DOUBLE[], anchor::DOUBLE[], lag);
