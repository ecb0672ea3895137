-- forecast and forecast_models: see udf/forecast.go.
CREATE OR REPLACE TEMP MACRO forecast(source, "by", "at", value, horizon := {{.horizon}}, coverage := {{.coverage}}, period := NULL,
                                      alpha := {{.alpha}}, fill := {{.fill}}, holdout := {{.holdout}}, point := {{.point}}) AS TABLE
    FROM query(plumb_forecast_sql(source, "by", "at", value, horizon::BIGINT, coverage::DOUBLE, period::BIGINT,
                                  alpha::DOUBLE, fill, holdout::BIGINT, point, false));
CREATE OR REPLACE TEMP MACRO forecast_models(source, "by", "at", value, horizon := {{.horizon}}, coverage := {{.coverage}}, period := NULL,
                                             alpha := {{.alpha}}, fill := {{.fill}}, holdout := {{.holdout}}, point := {{.point}}) AS TABLE
    FROM query(plumb_forecast_sql(source, "by", "at", value, horizon::BIGINT, coverage::DOUBLE, period::BIGINT,
                                  alpha::DOUBLE, fill, holdout::BIGINT, point, true));
