# Reference cross-correlations between a model's residuals and a prewhitened input, with the
# portmanteau over lags 0..L (the Box-Jenkins check of the transfer-function part).
# Run from the repository root: Rscript tests/reference/residual_ccf/make_residual_ccf.R
#
# Procedure (base R only; the residuals come from stats::arima, never from lagsieve):
#   x: the differenced input over the residual sample (n values, row t paired with residual t).
#   Prewhitening AR: x demeaned by its sample mean; orders 0..cap, cap = min(10, n %/% 5), each
#   fitted by least squares without intercept on the common rows t = cap+1..n and scored by
#   AIC = m log(RSS / m) + 2 (p + 1), m = n - cap; the first minimum wins and is refitted on rows
#   p+1..n. alpha = its residuals (n - p values), paired with residuals e[p+1..n].
#   values[k + L] = ccf(e, alpha) at lag k = cor(e[t + k], alpha[t]), k = -L..L, L = min(24, m %/% 4)
#   with m = n - p: positive k = input first, where a missing transfer-function term shows.
#   band = 1.96 / sqrt(m); S = m (m + 2) sum_{k=0..L} r_k^2 / (m - k), df = max(1, L + 1 - terms),
#   terms = r + s + 1 of the input's transfer function; p_value = pchisq(S, df, lower.tail = FALSE).
source(file.path("tests", "reference", "common", "json_writer.R"))

residual_input_ccf <- function(e, x, terms, max_lag = 24L, ar_max = 10L, z = 1.96) {
  n <- length(x)
  stopifnot(length(e) == n)
  cap <- min(ar_max, n %/% 5L)
  xc <- x - mean(x)
  rows <- (cap + 1):n
  aic <- sapply(0:cap, function(p) {
    y <- xc[rows]
    rss <- if (p == 0) sum(y^2) else {
      X <- sapply(1:p, function(j) xc[rows - j])
      sum(residuals(lm(y ~ 0 + X))^2)
    }
    length(rows) * log(rss / length(rows)) + 2 * (p + 1)
  })
  p <- which.min(aic) - 1L
  if (p > 0) {
    X <- sapply(1:p, function(j) xc[((p + 1):n) - j])
    fit <- lm(xc[(p + 1):n] ~ 0 + X)
    phi <- unname(coef(fit))
    alpha <- unname(residuals(fit))
    # The same filter written out: alpha_t = xc_t - sum_j phi_j xc_{t-j}.
    alpha2 <- as.numeric(stats::filter(xc, c(1, -phi), method = "convolution", sides = 1))[(p + 1):n]
    stopifnot(isTRUE(all.equal(alpha, alpha2, tolerance = 1e-12)))
  } else {
    phi <- numeric(0)
    alpha <- xc
  }
  es <- e[(p + 1):n]
  m <- length(es)
  L <- min(max_lag, m %/% 4L)
  cc <- ccf(es, alpha, lag.max = L, plot = FALSE)
  stopifnot(all(cc$lag[, 1, 1] == -L:L))
  r <- cc$acf[, 1, 1]
  r0 <- r[(L + 1):(2 * L + 1)]
  S <- m * (m + 2) * sum(r0^2 / (m - 0:L))
  df <- max(1L, L + 1L - terms)
  list(ar_order = p, ar_phi = I(phi), ar_mean = mean(x), aic = aic, n = m, max_lag = L,
       lags = -L:L, values = r, band = z / sqrt(m), statistic = S, df = df,
       p_value = pchisq(S, df, lower.tail = FALSE),
       largest_lag = (0:L)[which.max(abs(r0))])
}

d <- load_bjsales()
dy <- diff(d$sales)
dx <- diff(d$lead)

# Case 1: Series M with the right delay but no denominator (y_t = c + w0 x_{t-3} + MA(1)); the
# residual sample is t = 4..149 and the input is paired row by row over it.
fit1 <- arima(dy[4:149], order = c(0, 0, 1), xreg = dx[1:146], method = "ML")
e1 <- as.numeric(residuals(fit1))
x1 <- dx[4:149]
# Case 2: the lead entered without delay (b = 0, s = 0): the missing term sits at lag 3.
fit2 <- arima(dy, order = c(0, 0, 1), xreg = dx, method = "ML")
e2 <- as.numeric(residuals(fit2))
x2 <- dx
# Case 3: a short synthetic pair (n = 60, AR(2) input) with terms = 3, so cap and L are small.
set.seed(20240611)
x3 <- as.numeric(arima.sim(list(ar = c(0.5, -0.3)), n = 60))
e3 <- rnorm(60) + 0.5 * c(0, x3[1:59])

cases <- list(
  list(id = "series_m_b3_s0_r0", note = "arima(dy[4:149], c(0,0,1), xreg = dx[1:146]); x = dx[4:149]",
       terms = 1L, e = e1, x = x1),
  list(id = "series_m_b0_s0_r0", note = "arima(dy, c(0,0,1), xreg = dx): delay missing; x = dx",
       terms = 1L, e = e2, x = x2),
  list(id = "synthetic_n60", note = "x AR(2) simulated, e = N(0,1) + 0.5 x_{t-1}; terms = 3",
       terms = 3L, e = e3, x = x3)
)
for (i in seq_along(cases)) {
  res <- residual_input_ccf(cases[[i]]$e, cases[[i]]$x, cases[[i]]$terms)
  cases[[i]] <- c(cases[[i]], list(expected = res))
}
write_fixture(list(
  description = "Cross-correlation of residuals with the AR-prewhitened input, lags -L..L, and the portmanteau over lags 0..L",
  source = paste("R", r_version(), "stats::arima residuals, lm AR fits, stats::ccf, stats::pchisq"),
  conventions = "values[k + L] = ccf(e, alpha) at lag k = cor(e[t+k], alpha[t]); positive k: input first",
  options = list(max_lag = 24L, ar_max_order = 10L, band_z = 1.96),
  cases = cases
), ref_dir("residual_ccf", "residual_ccf_r.json"))
