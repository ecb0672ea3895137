-- differenced: see udf/differenced.go.
CREATE OR REPLACE TEMP MACRO differenced(source, "by", "at", value, lag := {{.lag}}, times := {{.times}}) AS TABLE
    FROM query(plumb_differenced_sql(source, "by", "at", value, lag, times));
