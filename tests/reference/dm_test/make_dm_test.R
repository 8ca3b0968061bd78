# Diebold-Mariano test with the Harvey-Leybourne-Newbold (1997) small-sample correction,
# written directly from the papers' formulas (no package). Writes dm_test_r.json.
# Run from the repository root: Rscript tests/reference/dm_test/make_dm_test.R
#
#   d_t   = L(e1_t) - L(e2_t),  dbar = mean(d)
#   g_k   = (1/n) sum_{t=k+1}^{n} (d_t - dbar)(d_{t-k} - dbar)
#   V     = g_0 + 2 sum_{k=1}^{h-1} g_k                  (rectangular, h-1 lags)
#   DM    = dbar / sqrt(V / n)
#   HLN   = DM * sqrt((n + 1 - 2h + h(h-1)/n) / n)
#   p     = 2 * P(T_{n-1} > |HLN|)                       (two-sided, Student t, n-1 df)
source(file.path("tests", "reference", "common", "json_writer.R"))

set.seed(20240501)
n <- 60L
# Two forecast-error series with serial correlation (as multi-step errors have) and cross
# correlation (e1 turns out to have the larger losses: dbar > 0).
u <- rnorm(n + 5)
e1 <- u[6:(n + 5)] + 0.5 * u[5:(n + 4)] + 0.3 * rnorm(n)
e2 <- 0.8 * e1 + 0.6 * rnorm(n) + 0.4 * u[4:(n + 3)] + 0.15

dm_stat <- function(e1, e2, h, loss) {
  L <- switch(loss, squared = function(e) e^2, absolute = function(e) abs(e))
  d <- L(e1) - L(e2)
  n <- length(d)
  dbar <- mean(d)
  dc <- d - dbar
  g <- vapply(0:(h - 1), function(k) sum(dc[(k + 1):n] * dc[1:(n - k)]) / n, 0)
  V <- g[1] + 2 * sum(g[-1])
  stopifnot(V > 0)
  dm <- dbar / sqrt(V / n)
  hln <- dm * sqrt((n + 1 - 2 * h + h * (h - 1) / n) / n)
  list(loss = loss, h = as.integer(h), n = as.integer(n),
       dbar = dbar, autocov_0_to_h_minus_1 = I(g), V = V,
       dm = dm, p_value_normal = 2 * pnorm(-abs(dm)),
       dm_hln = hln, p_value_hln_t = 2 * pt(-abs(hln), df = n - 1))
}

cases <- list()
for (loss in c("squared", "absolute")) for (h in c(1L, 3L, 6L)) {
  r <- dm_stat(e1, e2, h, loss)
  cases[[length(cases) + 1]] <- r
  cat(sprintf("%-8s h=%d dbar=%.8f V=%.8f DM=%.8f HLN=%.8f p=%.8f\n", loss, h, r$dbar, r$V,
              r$dm, r$dm_hln, r$p_value_hln_t))
}

write_fixture(list(
  description = paste("Diebold-Mariano statistic with the Harvey-Leybourne-Newbold correction",
                      "for two fixed forecast-error series, by an independent base-R script."),
  source = paste(r_version(), "base R only; set.seed(20240501) generated e1, e2 (stored below)"),
  references = paste("Diebold & Mariano (1995), J. Business & Economic Statistics 13, 253-263;",
                     "Harvey, Leybourne & Newbold (1997), Int. J. Forecasting 13, 281-291"),
  formulas = paste("d_t = L(e1_t) - L(e2_t); dbar = mean(d); g_k = (1/n) sum_{t=k+1}^{n}",
                   "(d_t - dbar)(d_{t-k} - dbar); V = g_0 + 2 sum_{k=1}^{h-1} g_k;",
                   "DM = dbar / sqrt(V/n); HLN = DM * sqrt((n + 1 - 2h + h(h-1)/n) / n);",
                   "p = 2 P(T_{n-1} > |HLN|). Negative dbar favours series e1 (smaller loss)."),
  e1 = I(e1), e2 = I(e2),
  cases = cases), ref_dir("dm_test", "dm_test_r.json"))
