-- diagnose: see udf/diagnose.go.
CREATE OR REPLACE TEMP MACRO diagnose(source, "by", "at", value, period := NULL, alpha := {{.alpha}}, fill := {{.fill}},
                                      shard := NULL, shards := NULL) AS TABLE
    FROM query(plumb_diagnose_sql(source, "by", "at", value, period::BIGINT, alpha::DOUBLE, fill, shard::BIGINT, shards::BIGINT));
