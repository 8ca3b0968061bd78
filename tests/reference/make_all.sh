#!/bin/sh
# Regenerates every reference fixture. Run from the repository root:
#   sh tests/reference/make_all.sh
# Needs: apt-get install -y r-base-core python3-statsmodels  (Debian's /usr/bin/python3).
set -e
R=/usr/bin/Rscript
PY=/usr/bin/python3
ref=tests/reference
$R $ref/data/make_data.R
$R $ref/likelihood_fixed/make_likelihood_fixed.R
$PY $ref/likelihood_fixed/make_likelihood_fixed.py
$R $ref/ml_optimum/make_ml_optimum.R
$PY $ref/ml_optimum/make_ml_optimum.py
$R $ref/series_m/make_series_m.R
$R $ref/series_m/make_series_m_estimated_start.R
$R $ref/filter_start/make_filter_start.R
$R $ref/standard_errors/make_standard_errors.R
$R $ref/optimum_grid/make_optimum_grid.R
$PY $ref/optimum_grid/make_optimum_grid.py
$R $ref/forecast_airline/make_forecast_airline.R
$PY $ref/forecast_airline/make_forecast_airline.py
$R $ref/forecast_regression/make_forecast_regression.R
$PY $ref/forecast_regression/make_forecast_regression.py
$R $ref/psi_weights/make_psi_weights.R
$PY $ref/psi_weights/make_psi_weights.py
$R $ref/correlation/make_correlation.R
$PY $ref/correlation/make_correlation.py
$R $ref/dm_test/make_dm_test.R
$PY $ref/dm_test/make_dm_test.py
$R $ref/ljung_box/make_ljung_box.R
$PY $ref/ljung_box/make_ljung_box.py
$R $ref/residual_ccf/make_residual_ccf.R
$R $ref/screen/make_indicator_seatbelts.R
$R $ref/missing_target/make_missing_target.R
$PY $ref/missing_target/make_missing_target.py
$R $ref/calendar/make_calendar.R
$R $ref/outliers/make_nile_csv.R
$R $ref/outliers/make_nile.R
$R $ref/past_fit/make_past_fit.R

# Fixtures kept by other topics beside their tests.
$R $ref/distributions/make_distributions.R
$R tests/revalidate/reference/make_checks.R
$R $ref/screen/make_correlation.R
echo "all fixtures regenerated"
