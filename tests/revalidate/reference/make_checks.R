# Reference values for the re-validation checks (src/revalidate/checks.h), from R base `stats`.
# Writes checks_r.json. Run from the repository root:
#   Rscript tests/revalidate/reference/make_checks.R
source(file.path("tests", "reference", "common", "json_writer.R"))

set.seed(20240601)
x1 <- rnorm(80)
x2 <- 0.2 + 1.3 * as.numeric(arima.sim(list(ar = 0.4), n = 120))
e1 <- abs(rnorm(100, sd = 1.1))                                   # independent scaled errors
e2 <- abs(as.numeric(arima.sim(list(ma = c(0.7, 0.4)), n = 90)))  # overlapping 3-step errors

ljung <- function(x, lag, fitdf) {
  b <- Box.test(x, lag = lag, type = "Ljung-Box", fitdf = fitdf)
  list(x = I(x), lag = as.integer(lag), fitdf = as.integer(fitdf),
       statistic = unname(b$statistic), df = as.integer(b$parameter), p_value = b$p.value)
}
ttest <- function(x) {
  t <- t.test(x)
  list(x = I(x), fit_count = 0L, mean = mean(x), sd = sd(x), statistic = unname(t$statistic),
       p_value = t$p.value)
}
# With the error of a mean fitted on m earlier values: t = mean / (sd sqrt(1/n + 1/m)), n - 1 df.
ttest_fitted <- function(x, m) {
  n <- length(x)
  t <- mean(x) / (sd(x) * sqrt(1 / n + 1 / m))
  list(x = I(x), fit_count = as.integer(m), mean = mean(x), sd = sd(x), statistic = t,
       p_value = 2 * pt(abs(t), n - 1, lower.tail = FALSE))
}
variance <- function(x, sigma2, df2) {
  ratio <- mean(x^2) / sigma2
  n <- length(x)
  p <- 2 * min(pf(ratio, n, df2), pf(ratio, n, df2, lower.tail = FALSE))
  list(x = I(x), sigma2 = sigma2, df_reference = df2, ratio = ratio, p_value = min(1, p))
}
coverage <- function(inside, count, level) {
  p <- 2 * min(pbinom(inside, count, level), pbinom(inside - 1, count, level, lower.tail = FALSE))
  list(inside = as.integer(inside), count = as.integer(count), level = level, p_value = min(1, p))
}
# Degradation test (checks.h): long-run variance from R's acf (demeaned, divisor n), Student t.
degradation <- function(e, h, m0, n0) {
  n <- length(e)
  g <- as.numeric(acf(e, lag.max = h - 1, type = "covariance", demean = TRUE, plot = FALSE)$acf)
  S <- g[1] + if (h > 1) 2 * sum(g[2:h]) else 0
  inv <- 1 / n + if (n0 > 0) 1 / n0 else 0
  T <- (mean(e) - m0) / sqrt(S * inv)
  list(e = I(e), horizon = as.integer(h), baseline = m0, baseline_count = as.integer(n0),
       mean = mean(e), long_run_variance = S, statistic = T,
       p_value = pt(T, n - 1, lower.tail = FALSE))
}

write_fixture(list(
  description = "Reference values of the re-validation checks: Ljung-Box, one-sample t, F ratio, binomial coverage, degradation test.",
  source = paste(r_version(), "stats::Box.test(type='Ljung-Box'), t.test, pf, pbinom, acf(type='covariance'), pt"),
  ljung_box = list(ljung(x1, 10, 0), ljung(x2, 12, 1)),
  mean_shift = list(ttest(x1), ttest(x2), ttest_fitted(x2, 297)),
  variance = list(variance(x1, 1.0, 250), variance(x2, 1.1, 300)),
  f_cdf = list(list(x = 0.7, d1 = 5, d2 = 12, p = pf(0.7, 5, 12)),
               list(x = 1.9, d1 = 100, d2 = 297, p = pf(1.9, 100, 297)),
               list(x = 1.05, d1 = 30.5, d2 = 7, p = pf(1.05, 30.5, 7))),
  binomial = list(list(k = 3, n = 20, p = 0.2, cdf = pbinom(3, 20, 0.2)),
                  list(k = 88, n = 100, p = 0.95, cdf = pbinom(88, 100, 0.95)),
                  list(k = 0, n = 7, p = 0.4, cdf = pbinom(0, 7, 0.4))),
  coverage = list(coverage(88, 100, 0.95), coverage(79, 99, 0.8), coverage(100, 100, 0.95)),
  degradation = list(degradation(e1, 1, 0.75, 150), degradation(e2, 3, 0.9, 0),
                     degradation(e1, 1, 1.2, 60))),
  file.path("tests", "revalidate", "reference", "checks_r.json"))
