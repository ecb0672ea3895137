-- combine_diagnoses: see udf/combine_diagnoses.go.
CREATE OR REPLACE TEMP MACRO combine_diagnoses(source) AS TABLE
    FROM query(plumb_combine_sql(source));
