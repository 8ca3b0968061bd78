# Regression with ARMA(1,1) errors and KNOWN future regressors: R's predict(arima(..., xreg=),
# newxreg=) at fixed parameters and at the ML fit. Writes forecast_regression_r.json.
# Run from the repository root: Rscript tests/reference/forecast_regression/make_forecast_regression.R
source(file.path("tests", "reference", "common", "json_writer.R"))

bj <- load_bjsales()
stopifnot(identical(bj$sales, as.numeric(datasets::BJsales)),
          identical(bj$lead, as.numeric(datasets::BJsales.lead)))
dy <- diff(bj$sales); dx <- diff(bj$lead)
# Aligned sample: y_t = dy[t], x_t = dx[t - 3], t = 4..149 of the differenced series.
y_all <- dy[4:149]; x_all <- dx[1:146]
n_fit <- 130L; h <- 10L
y <- y_all[1:n_fit]; x <- x_all[1:n_fit]
x_future <- x_all[n_fit + 1:h]; y_future <- y_all[n_fit + 1:h]
X <- matrix(x, ncol = 1, dimnames = list(NULL, "lead_lag3"))
Xf <- matrix(x_future, ncol = 1, dimnames = list(NULL, "lead_lag3"))

fixed_sets <- list(c(ar1 = 0.6, ma1 = 0.08, intercept = 0.36, lead_lag3 = 2.77),
                   c(ar1 = 0.3, ma1 = 0.5, intercept = 0.0, lead_lag3 = 2.5))
fixed_out <- lapply(seq_along(fixed_sets), function(i) {
  p <- fixed_sets[[i]]
  f <- arima(y, order = c(1, 0, 1), xreg = X, include.mean = TRUE, method = "ML",
             fixed = unname(p), transform.pars = FALSE)
  fc <- predict(f, n.ahead = h, newxreg = Xf)
  list(id = sprintf("fixed_%d", i), coef_names = I(names(p)), coef = I(unname(p)),
       sigma2 = f$sigma2, loglik = f$loglik,
       pred = I(as.numeric(fc$pred)), se = I(as.numeric(fc$se)))
})
fml <- arima(y, order = c(1, 0, 1), xreg = X, include.mean = TRUE, method = "ML",
             optim.control = list(reltol = 1e-13, maxit = 2000))
fcml <- predict(fml, n.ahead = h, newxreg = Xf)
ml_out <- list(id = "ml", coef_names = I(names(coef(fml))), coef = I(unname(coef(fml))),
               se_coef = I(unname(sqrt(diag(fml$var.coef)))),
               sigma2 = fml$sigma2, loglik = fml$loglik,
               pred = I(as.numeric(fcml$pred)), se = I(as.numeric(fcml$se)))
for (o in c(fixed_out, list(ml_out)))
  cat(sprintf("%-8s sigma2=%.10g pred1=%.10f se1=%.10f\n", o$id, o$sigma2, o$pred[1], o$se[1]))

write_fixture(list(
  description = paste("Forecasts of y = diff(BJsales) with regression on the lag-3 differenced",
                      "lead and ARMA(1,1) errors, future regressor values known."),
  source = paste(r_version(), "f <- arima(y, order=c(1,0,1), xreg=x, include.mean=TRUE,",
                 "method='ML', fixed=coef, transform.pars=FALSE) (or the ML fit with",
                 "optim.control=list(reltol=1e-13)); predict(f, n.ahead=10, newxreg=x_future)"),
  data = paste("From data/bjsales.csv: dy = diff(sales), dx = diff(lead) (149 values);",
               "aligned y_t = dy[t], x_t = dx[t-3] for t = 4..149 (146 pairs); the first 130",
               "pairs are the fitting sample, pairs 131..140 the forecast period."),
  conventions = paste("y_t = intercept + lead_lag3 * x_t + n_t, (1 - ar1 B) n_t = (1 + ma1 B) a_t;",
                      "sigma2 is R's concentrated SSR/n at the given coefficients (used by predict);",
                      "se = forecast standard error of y (regressors treated as known)."),
  n = n_fit, horizon = I(1:h),
  y = I(y), x = I(x), x_future = I(x_future), y_future_actual = I(y_future),
  fixed = fixed_out,
  ml = ml_out), ref_dir("forecast_regression", "forecast_regression_r.json"))
