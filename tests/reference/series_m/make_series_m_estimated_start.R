# Series M transfer-function model with the pre-sample state of 1/(1 - delta1 B) estimated:
#   y_t = c + omega0 / (1 - delta1 B) x_{t-3} + k h_t + (1 + theta B) a_t,
#   y = diff(BJsales), x = diff(BJsales.lead), h_t = delta1^(t - 4) for t = 4..149,
# where x / (1 - delta1 B) is filtered from a zero state and k h_t is the homogeneous solution of
# (1 - delta1 B) that an unknown filter state before the sample adds (one linear parameter per
# denominator order, concentrated out with the other linear ones). For fixed delta1 the model is
# a regression with MA(1) errors on (1, xf_{t-3}, h_t): arima() maximises over (theta, c,
# omega0, k) and optimize() maximises the profile over delta1.
# Writes series_m_estimated_start_r.json. Run from the repository root:
#   Rscript tests/reference/series_m/make_series_m_estimated_start.R
source(file.path("tests", "reference", "common", "json_writer.R"))

bj <- load_bjsales()
stopifnot(identical(bj$sales, as.numeric(datasets::BJsales)),
          identical(bj$lead, as.numeric(datasets::BJsales.lead)))
dy <- diff(bj$sales)
dx <- diff(bj$lead)
nd <- length(dy)            # 149
y <- dy[4:nd]               # 146 observations used
tight <- list(reltol = 1e-13, maxit = 2000)

regressors <- function(delta) {
  xf <- as.numeric(stats::filter(dx, delta, method = "recursive"))
  cbind(omega0 = xf[1:(nd - 3)], start1 = delta^(0:(length(y) - 1)))
}
fit_at <- function(delta) {
  arima(y, order = c(0, 0, 1), xreg = regressors(delta), include.mean = TRUE, method = "ML",
        optim.control = tight)
}
profile <- function(delta) fit_at(delta)$loglik
grid <- seq(-0.95, 0.95, by = 0.05)
grid_ll <- vapply(grid, profile, 0)
best <- grid[which.max(grid_ll)]
opt <- optimize(profile, interval = c(-0.99, 0.99), maximum = TRUE, tol = 1e-10)
stopifnot(abs(opt$maximum - best) < 0.1)
X <- regressors(opt$maximum)  # in this frame, so that predict() can re-read the call's xreg
fit <- arima(y, order = c(0, 0, 1), xreg = X, include.mean = TRUE, method = "ML",
             optim.control = tight)
cf <- coef(fit)
cat(sprintf("delta1=%.8f omega0=%.8f intercept=%.8f theta=%.8f start1=%.6f sigma2=%.8g loglik=%.8f\n",
            opt$maximum, cf["omega0"], cf["intercept"], cf["ma1"], cf["start1"], fit$sigma2,
            fit$loglik))

# Forecasts of the differenced sales for t = 150..152 (b = 3: the lead is known to t = 149): the
# zero-start filtered lead continues and the state column continues as delta1^(t - 4); the sales
# forecast is the last value plus their cumulative sum.
xf <- as.numeric(stats::filter(dx, opt$maximum, method = "recursive"))
newx <- cbind(omega0 = xf[(nd - 2):nd], start1 = opt$maximum^(length(y) + 0:2))
pr <- predict(fit, n.ahead = 3, newxreg = newx)
sales_forecast <- bj$sales[length(bj$sales)] + cumsum(as.numeric(pr$pred))

write_fixture(list(
  description = paste("Series M transfer-function model, exact ML by profile likelihood over",
                      "delta_1, with the filter's pre-sample state estimated as a linear",
                      "parameter (the homogeneous solution delta1^(t-4) as a regressor)."),
  source = paste(r_version(), "stats::filter(dx, delta1, method='recursive');",
                 "stats::arima(y, order=c(0,0,1), xreg=cbind(xf_lag3, delta1^(0:145)),",
                 "include.mean=TRUE, method='ML', optim.control=list(reltol=1e-13, maxit=2000));",
                 "stats::optimize(profile, c(-0.99, 0.99), maximum=TRUE, tol=1e-10)"),
  conventions = paste("delta(B) = 1 - delta1 B; theta(B) = 1 + theta B; the state column is 1",
                      "at the first observation used (t = 4 of the differenced series); k = 6",
                      "with sigma2 (delta1, theta, intercept, omega0, start1, sigma2)"),
  n = as.integer(fit$nobs),
  delta1 = opt$maximum, omega0 = cf[["omega0"]], intercept = cf[["intercept"]],
  theta = cf[["ma1"]], start1 = cf[["start1"]], sigma2 = fit$sigma2, loglik = fit$loglik,
  profile_grid = list(delta1 = I(grid), loglik = I(grid_ll)),
  forecast_note = paste("predict(fit, n.ahead = 3, newxreg = cbind(xf[147:149],",
                        "delta1^(146:148))): sales at t = 151..153 = sales[150] + cumsum(pred)"),
  sales_forecast = I(sales_forecast)),
  ref_dir("series_m", "series_m_estimated_start_r.json"))
