# A grid of regression-with-ARMA-errors candidates on one simulated sample, fitted by R's arima
# (exact ML) as the reference for the optimum our fits must reach (test: loglik >= best of R
# and statsmodels - 1e-4 on every candidate).
#   data: n = 500, x1, x2, x3 stationary AR(1) drivers; y = 2 + 1.2 x1 - 0.8 x1_{t-1}
#         + 0.9 x2_{t-1} + 0.5 x3_{t-2} + noise, noise ARMA(2,1) phi = (0.5, 0.3),
#         theta = 0.4 (fitted by ARMA(1,2) its likelihood has several local maxima).
#   candidates: x1 at lags 0..s1 (s1 in 0..2), x2 at lags 1..1+s2 (s2 in 0..1), x3 at lags
#         2..2+s3 (s3 in 0..1), noise (p, q) in 0..2 x 0..2: 12 x 9 = 108 candidates. Every
#         candidate uses the common sample t = 4..500 (the largest lag is 3), n = 497.
# Writes optimum_grid_r.json. Run from the repository root:
#   Rscript tests/reference/optimum_grid/make_optimum_grid.R
source(file.path("tests", "reference", "common", "json_writer.R"))

set.seed(20261203)
n <- 500
ar1_driver <- function(phi) as.numeric(arima.sim(list(ar = phi), n, n.start = 200))
x1 <- ar1_driver(0.7)
x2 <- ar1_driver(0.4)
x3 <- ar1_driver(0.85)
noise <- as.numeric(arima.sim(list(ar = c(0.5, 0.3), ma = 0.4), n, n.start = 200, sd = 0.7))
lag <- function(x, k) c(rep(NA, k), x[seq_len(n - k)])
y <- 2 + 1.2 * x1 - 0.8 * lag(x1, 1) + 0.9 * lag(x2, 1) + 0.5 * lag(x3, 2) + noise
y[is.na(y)] <- 0  # rows 1..3 are outside every candidate's sample
rows <- 4:n

cases <- list()
for (s1 in 0:2) for (s2 in 0:1) for (s3 in 0:1) for (p in 0:2) for (q in 0:2) {
  cols <- list()
  for (k in 0:s1) cols[[paste0("x1_l", k)]] <- lag(x1, k)[rows]
  for (k in 1:(1 + s2)) cols[[paste0("x2_l", k)]] <- lag(x2, k)[rows]
  for (k in 2:(2 + s3)) cols[[paste0("x3_l", k)]] <- lag(x3, k)[rows]
  xreg <- do.call(cbind, cols)
  fit <- tryCatch(arima(y[rows], order = c(p, 0, q), xreg = xreg, include.mean = TRUE,
                        method = "ML", optim.control = list(maxit = 2000)),
                  error = function(e) NULL)
  id <- sprintf("s%d%d%d_p%dq%d", s1, s2, s3, p, q)
  cases[[length(cases) + 1]] <- list(
    id = id, s1 = s1, s2 = s2, s3 = s3, p = p, q = q,
    ok = !is.null(fit),
    loglik = if (is.null(fit)) NA_real_ else fit$loglik,
    coef_names = if (is.null(fit)) I(character(0)) else I(names(coef(fit))),
    coef = if (is.null(fit)) I(numeric(0)) else I(unname(coef(fit))))
}
cat(sprintf("%d candidates, %d fitted\n", length(cases), sum(sapply(cases, `[[`, "ok"))))

write_fixture(list(
  description = paste("Regression with ARMA errors over a grid of lag windows and (p, q) in",
                      "0..2 on one simulated sample; R's exact-ML optimum of each candidate."),
  source = paste(r_version(), "set.seed(20261203); arima.sim; stats::arima(y[4:500],",
                 "order=c(p,0,q), xreg=lag columns, include.mean=TRUE, method='ML',",
                 "optim.control=list(maxit=2000))"),
  conventions = paste("columns x1 lags 0..s1, x2 lags 1..1+s2, x3 lags 2..2+s3; sample rows",
                      "4..500 (1-based) of y; theta(B) = 1 + theta B; loglik with sigma2",
                      "concentrated"),
  n = n, x1 = I(x1), x2 = I(x2), x3 = I(x3), y = I(y),
  cases = cases), ref_dir("optimum_grid", "optimum_grid_r.json"))
