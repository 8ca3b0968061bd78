# Reference autocorrelations, partial autocorrelations and cross-correlations of the differenced
# Series M pair (R's datasets::BJsales and BJsales.lead, stored in tests/reference/data/bjsales.csv).
# Run from the repository root: Rscript tests/reference/screen/make_correlation.R
#
# Lag convention of the fixture: `ccf_lead_sales[k + L]` (k = -L..L) is R's ccf(dsales, dlead) at
# lag k, the estimate of cor(dsales[t + k], dlead[t]); positive k = the lead comes first.
source(file.path("tests", "reference", "common", "json_writer.R"))
d <- load_bjsales()
dsales <- diff(d$sales)
dlead <- diff(d$lead)
L <- 20L
a_sales <- acf(dsales, lag.max = L, plot = FALSE)$acf[, 1, 1]
a_lead <- acf(dlead, lag.max = L, plot = FALSE)$acf[, 1, 1]
p_sales <- pacf(dsales, lag.max = L, plot = FALSE)$acf[, 1, 1]
p_lead <- pacf(dlead, lag.max = L, plot = FALSE)$acf[, 1, 1]
cc <- ccf(dsales, dlead, lag.max = L, plot = FALSE)
stopifnot(all(cc$lag[, 1, 1] == -L:L))
# Prewhitening AR fit as the screen does it: demean by the sample mean, then least squares without
# intercept on t = p+1..n (order 3 fixed here, to check the arithmetic rather than the order rule).
xc <- dlead - mean(dlead)
n <- length(xc)
X <- cbind(xc[3:(n - 1)], xc[2:(n - 2)], xc[1:(n - 3)])
fit <- lm(xc[4:n] ~ 0 + X)
ar3 <- unname(coef(fit))
ar3_sigma2 <- sum(residuals(fit)^2) / length(residuals(fit))
# Order choice as the screen does it: every order 0..10 scored on the same rows t = 11..n,
# AIC = m log(RSS / m) + 2 (p + 1) with m = n - 10.
cap <- 10L
m <- n - cap
aic <- sapply(0:cap, function(p) {
  y <- xc[(cap + 1):n]
  rss <- if (p == 0) sum(y^2) else {
    X <- sapply(1:p, function(j) xc[(cap + 1 - j):(n - j)])
    sum(residuals(lm(y ~ 0 + X))^2)
  }
  m * log(rss / m) + 2 * (p + 1)
})
write_fixture(list(
  source = paste("R", r_version(), "stats::acf, stats::pacf, stats::ccf on diff(BJsales), diff(BJsales.lead)"),
  max_lag = L,
  n = length(dsales),
  acf_sales = a_sales,             # lags 0..L
  acf_lead = a_lead,
  pacf_sales = p_sales,            # lags 1..L
  pacf_lead = p_lead,
  ccf_lead_sales = cc$acf[, 1, 1], # lags -L..L
  ar3_lead = ar3,                   # OLS AR(3) of the demeaned dlead
  ar3_lead_sigma2 = ar3_sigma2,     # residual sum of squares / (n - 3)
  aic_lead = aic,                   # orders 0..10 on a common sample
  aic_order_lead = which.min(aic) - 1L
), ref_dir("screen", "correlation_bjsales.json"))
