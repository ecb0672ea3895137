-- demand_profile: see udf/demand_profile.go.
CREATE OR REPLACE TEMP MACRO demand_profile(series) AS
    plumb_demand_profile(series::DOUBLE[]);
