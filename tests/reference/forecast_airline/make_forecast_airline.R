# Forecasts of log AirPassengers from the ARIMA(0,1,1)(0,1,1)_12 model fitted by R's arima on
# the undifferenced series (default settings), and predict(fit, n.ahead = 24).
# Writes forecast_airline_r.json. Run from the repository root:
#   Rscript tests/reference/forecast_airline/make_forecast_airline.R
source(file.path("tests", "reference", "common", "json_writer.R"))

ap <- load_airpassengers()
stopifnot(identical(ap$passengers, as.numeric(datasets::AirPassengers)))
logap <- ts(log(ap$passengers), start = c(1949, 1), frequency = 12)
fit <- arima(logap, order = c(0, 1, 1), seasonal = list(order = c(0, 1, 1), period = 12))
fc <- predict(fit, n.ahead = 24)
cf <- coef(fit)

# Closed-form psi-weight standard errors: psi from theta(B) Theta(B^12) / ((1 - B)(1 - B^12)),
# i.e. the infinite-past approximation sigma2 * sum_{j<h} psi_j^2. It differs slightly from the
# finite-sample state-space value because the pre-sample innovations are not known exactly.
ar_diff <- numeric(13); ar_diff[1] <- 1; ar_diff[12] <- 1; ar_diff[13] <- -1  # (1-B)(1-B^12)
ma_full <- numeric(13); ma_full[1] <- cf[["ma1"]]; ma_full[12] <- cf[["sma1"]]
ma_full[13] <- cf[["ma1"]] * cf[["sma1"]]
psi <- c(1, ARMAtoMA(ar_diff, ma_full, 23))
se_psi <- sqrt(fit$sigma2 * cumsum(psi^2))

cat("pred[1:3] =", sprintf("%.12f", fc$pred[1:3]), "\n")
cat("se[1:3]   =", sprintf("%.12f", fc$se[1:3]), "\n")
cat("max rel diff se vs psi-weight se:", max(abs(fc$se - se_psi) / fc$se), "\n")

write_fixture(list(
  description = paste("24-step forecasts (log scale) of log(AirPassengers) from R's arima",
                      "ARIMA(0,1,1)(0,1,1)_12 fit on the undifferenced series."),
  source = paste(r_version(), "fit <- arima(log(AirPassengers), order=c(0,1,1),",
                 "seasonal=list(order=c(0,1,1), period=12)) [default: CSS-ML, kappa=1e6];",
                 "predict(fit, n.ahead=24)"),
  data = "log(passengers) of data/airpassengers.csv, t = 1..144 (Jan 1949 - Dec 1960); forecasts are t = 145..168",
  conventions = paste("theta(B) = 1 + ma1 B, Theta(B^12) = 1 + sma1 B^12; pred = conditional mean",
                      "on the log scale; se = sqrt of the k-step forecast error variance",
                      "(sigma2 times the state-space variance from R's Kalman filter)."),
  n = 144L,
  coef_names = I(names(cf)),
  coef = I(unname(cf)),
  sigma2 = fit$sigma2,
  loglik = fit$loglik,
  horizon = I(1:24),
  pred = I(as.numeric(fc$pred)),
  se = I(as.numeric(fc$se)),
  psi_weights_0_to_23 = I(psi),
  se_psi_weights = I(se_psi),
  se_psi_weights_note = paste("sqrt(sigma2 * sum_{j<h} psi_j^2) with psi of the full",
                              "nonstationary operator; max relative difference from se:",
                              sprintf("%.3g", max(abs(fc$se - se_psi) / fc$se)))
), ref_dir("forecast_airline", "forecast_airline_r.json"))
