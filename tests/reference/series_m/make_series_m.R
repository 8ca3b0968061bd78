# Transfer-function model on Box-Jenkins Series M (R's BJsales / BJsales.lead), by an
# independent base-R profile likelihood:
#   y_t = c + omega_0 / (1 - delta_1 B) x_{t-3} + (1 + theta B) a_t,
#   y = diff(BJsales), x = diff(BJsales.lead).
# For fixed delta_1 the filtered input xf = x / (1 - delta_1 B) (zero pre-sample state, the
# recursion starting at the first differenced value) enters linearly, so arima() with xreg
# = xf lagged 3 maximises over (theta, c, omega_0); optimize() maximises the profile over delta_1.
# Writes series_m_r.json. Run from the repository root:
#   Rscript tests/reference/series_m/make_series_m.R
source(file.path("tests", "reference", "common", "json_writer.R"))

bj <- load_bjsales()
stopifnot(identical(bj$sales, as.numeric(datasets::BJsales)),
          identical(bj$lead, as.numeric(datasets::BJsales.lead)))
dy <- diff(bj$sales)
dx <- diff(bj$lead)
nd <- length(dy)            # 149
y <- dy[4:nd]               # 146 observations used
tight <- list(reltol = 1e-13, maxit = 2000)

regressor <- function(delta) {
  xf <- as.numeric(stats::filter(dx, delta, method = "recursive"))  # xf_t = x_t + delta xf_{t-1}, xf_0 = 0
  xf[1:(nd - 3)]                                                     # xf_{t-3}, t = 4..149
}
fit_at <- function(delta) {
  arima(y, order = c(0, 0, 1), xreg = matrix(regressor(delta), ncol = 1,
                                              dimnames = list(NULL, "omega0")),
        include.mean = TRUE, method = "ML", optim.control = tight)
}
profile <- function(delta) fit_at(delta)$loglik

# Coarse scan first, to make sure optimize() brackets the global maximum.
grid <- seq(-0.95, 0.95, by = 0.05)
grid_ll <- vapply(grid, profile, 0)
best <- grid[which.max(grid_ll)]
opt <- optimize(profile, interval = c(-0.99, 0.99), maximum = TRUE, tol = 1e-10)
stopifnot(abs(opt$maximum - best) < 0.1)
fit <- fit_at(opt$maximum)
cf <- coef(fit)
cat(sprintf("delta1=%.10f omega0=%.10f intercept=%.10f theta=%.10f sigma2=%.10g loglik=%.10f n=%d\n",
            opt$maximum, cf["omega0"], cf["intercept"], cf["ma1"], fit$sigma2, fit$loglik, fit$nobs))

# Joint check: Nelder-Mead over all four parameters with arima(fixed=) as the likelihood.
nll <- function(p) {
  if (abs(p[1]) >= 1 || abs(p[2]) >= 1) return(1e10)
  -arima(y, order = c(0, 0, 1), xreg = regressor(p[1]), fixed = p[2:4],
         transform.pars = FALSE, method = "ML")$loglik
}
joint <- optim(c(0.7, -0.5, 0.03, 4.8), nll, control = list(reltol = 1e-14, maxit = 5000))
stopifnot(abs(-joint$value - fit$loglik) < 1e-8, abs(joint$par[1] - opt$maximum) < 1e-5)

# Steady-state gain and first impulse-response weights, as closed forms of the estimates.
v <- c(0, 0, 0, cf[["omega0"]] * opt$maximum^(0:9))

write_fixture(list(
  description = paste("Series M transfer-function model, exact ML by profile likelihood over",
                      "delta_1 with zero pre-sample filter state."),
  source = paste(r_version(), "stats::filter(x, delta1, method='recursive');",
                 "stats::arima(y, order=c(0,0,1), xreg=xf_lag3, include.mean=TRUE, method='ML',",
                 "optim.control=list(reltol=1e-13, maxit=2000)); stats::optimize(profile,",
                 "c(-0.99, 0.99), maximum=TRUE, tol=1e-10)"),
  model = paste("y_t = intercept + omega0 / (1 - delta1 B) x_{t-3} + (1 + theta B) a_t;",
                "y = diff(sales), x = diff(lead) from data/bjsales.csv (149 differenced values);",
                "xf = x / (1 - delta1 B) with xf_0 = 0 (so xf_1 = x_1, the first differenced",
                "value); observations t = 4..149 of the differenced series are used (n = 146),",
                "regressor at t is xf_{t-3}."),
  conventions = paste("delta(B) = 1 - delta1 B; theta(B) = 1 + theta B (R's sign); loglik is",
                      "R's exact Gaussian with sigma2 = SSR/n concentrated; k = 5 estimated",
                      "parameters if sigma2 is counted (delta1, omega0, intercept, theta, sigma2)."),
  n = as.integer(fit$nobs),
  delta1 = opt$maximum,
  omega0 = cf[["omega0"]],
  intercept = cf[["intercept"]],
  theta = cf[["ma1"]],
  sigma2 = fit$sigma2,
  loglik = fit$loglik,
  aic_r_convention = -2 * fit$loglik + 2 * 5,
  steady_state_gain = cf[["omega0"]] / (1 - opt$maximum),
  impulse_response_v0_to_v12 = I(unname(v)),
  se_conditional_on_delta1 = list(
    note = paste("R's var.coef of the arima fit at the optimal delta1 (delta1 held fixed, so",
                 "these understate the joint standard errors)"),
    names = I(names(cf)), se = I(unname(sqrt(diag(fit$var.coef))))),
  joint_check = list(
    note = "optim(Nelder-Mead, reltol 1e-14) over (delta1, theta, intercept, omega0) jointly",
    par = I(joint$par), loglik = -joint$value),
  profile_grid = list(delta1 = I(grid), loglik = I(grid_ll)),
  published = list(
    status = "quoted from memory; verify against the book before relying on it",
    reference = paste("Box, Jenkins, Reinsel & Ljung, Time Series Analysis: Forecasting and",
                      "Control, 5th ed. (Wiley, 2015), transfer-function model fitting chapter",
                      "(believed ch. 12), Series M sales / leading indicator example; the same",
                      "model appears in earlier editions"),
    model_as_published = "Y_t = 0.035 + 4.82 / (1 - 0.72 B) X_{t-3} + (1 - 0.54 B) a_t",
    delta1 = 0.72, omega0 = 4.82, intercept = 0.035,
    theta_book_sign = 0.54,
    theta_in_our_sign = -0.54,
    note = paste("The book writes the MA factor as (1 - theta B), so our theta = -0.54. Its",
                 "estimation treats start-up values differently (conditional / back-forecast),",
                 "so agreement with the exact-ML numbers above is to about two digits at best."))
), ref_dir("series_m", "series_m_r.json"))
