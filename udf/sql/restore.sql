-- restore: see udf/restore.go.
CREATE OR REPLACE TEMP MACRO restore(source, recipes, "by", "at", value, anchor := {{.anchor}}) AS TABLE
    FROM query(plumb_restore_sql(source, recipes, "by", "at", value, anchor));
