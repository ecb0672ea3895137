-- stationarize and stationarize_recipes: see udf/stationarize.go.
CREATE OR REPLACE TEMP MACRO stationarize(source, "by", "at", value, period := NULL, alpha := {{.alpha}}) AS TABLE
    FROM query(plumb_stationarize_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, false));
CREATE OR REPLACE TEMP MACRO stationarize_recipes(source, "by", "at", value, period := NULL, alpha := {{.alpha}}) AS TABLE
    FROM query(plumb_stationarize_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, true));
