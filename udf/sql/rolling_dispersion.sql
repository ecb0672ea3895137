-- rolling_dispersion: see udf/rolling_dispersion.go.
CREATE OR REPLACE TEMP MACRO rolling_dispersion(source, "by", "at", value, width := {{.width}}) AS TABLE
    FROM query(plumb_rolling_dispersion_sql(source, "by", "at", value, width::BIGINT));
