-- white_noise: see udf/white_noise.go.
CREATE OR REPLACE TEMP MACRO white_noise(series, lags := {{.white_noise_lags}}, fitted := {{.white_noise_fitted}}) AS
    plumb_white_noise(series::DOUBLE[], lags::BIGINT, fitted::BIGINT);
