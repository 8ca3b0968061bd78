# Standard errors of regression with ARMA errors on R datasets whose regressors are strongly
# collinear (freeny, longley) or trending (LakeHuron on a linear trend), from R's arima (ML):
# sqrt(diag(var.coef)), R's numerical Hessian of the full log-likelihood. As an independent
# check the script also differentiates the log-likelihood itself (arima with fixed = every
# parameter, central second differences; each step is 0.05 / sqrt(curvature) of its parameter
# alone, so the log-likelihood moves by about 0.001: with collinear regressors the conditional
# curvature is far larger than 1 / se^2) and stores the largest relative difference between the
# two sets of standard errors.
# Writes standard_errors_r.json. Run from the repository root:
#   Rscript tests/reference/standard_errors/make_standard_errors.R
source(file.path("tests", "reference", "common", "json_writer.R"))

tight <- list(reltol = 1e-14, maxit = 5000)

hessian_se <- function(y, xreg, order, fit) {
  cf <- coef(fit)
  ll <- function(p) arima(y, order = order, xreg = xreg, fixed = p, transform.pars = FALSE,
                          method = "ML")$loglik
  k <- length(cf)
  f0 <- ll(cf)
  h <- 1e-6 * pmax(abs(cf), 1e-3)
  for (i in 1:k) {
    e <- replace(numeric(k), i, h[i])
    curv <- -(ll(cf + e) - 2 * f0 + ll(cf - e)) / h[i]^2
    h[i] <- 0.05 / sqrt(curv)
  }
  H <- matrix(0, k, k)
  for (i in 1:k) for (j in 1:i) {
    e_i <- replace(numeric(k), i, h[i]); e_j <- replace(numeric(k), j, h[j])
    H[i, j] <- H[j, i] <- (ll(cf + e_i + e_j) - ll(cf + e_i - e_j) - ll(cf - e_i + e_j) +
                           ll(cf - e_i - e_j)) / (4 * h[i] * h[j])
  }
  sqrt(diag(solve(-H)))
}

make_case <- function(id, note, y, xreg, order) {
  fit <- arima(y, order = order, xreg = xreg, include.mean = TRUE, method = "ML",
               optim.control = tight)
  se <- sqrt(diag(fit$var.coef))
  se_check <- hessian_se(y, xreg, order, fit)
  cat(sprintf("%s: loglik %.6f, max rel diff of s.e. (R vs own Hessian) %.2e\n", id, fit$loglik,
              max(abs(se_check / se - 1))))
  list(id = id, note = note, n = length(y), p = order[1], q = order[3],
       y = I(as.numeric(y)),
       xreg_names = I(colnames(xreg)),
       xreg = lapply(seq_len(ncol(xreg)), function(j) I(as.numeric(xreg[, j]))),
       coef_names = I(names(coef(fit))), coef = I(unname(coef(fit))), se = I(unname(se)),
       se_own_hessian = I(unname(se_check)),
       max_rel_diff_se_vs_own_hessian = max(abs(se_check / se - 1)),
       loglik = fit$loglik, sigma2 = fit$sigma2)
}

fr <- datasets::freeny
fx <- as.matrix(fr[, -1])
ln <- datasets::longley
lh <- as.numeric(datasets::LakeHuron)
trend <- matrix(seq_along(lh) - 1, ncol = 1, dimnames = list(NULL, "trend"))

cases <- list(
  make_case("freeny_ar1", paste("freeny: y on lag.quarterly.revenue, price.index, income.level,",
                                "market.potential (pairwise correlations up to 0.99), AR(1)"),
            as.numeric(fr$y), fx, c(1, 0, 0)),
  make_case("freeny_ar1_no_lag", "freeny without lag.quarterly.revenue, AR(1)",
            as.numeric(fr$y), fx[, -1], c(1, 0, 0)),
  make_case("longley_ar1", paste("longley: Employed on GNP, Population, Year (pairwise",
                                 "correlations above 0.99), AR(1), n = 16"),
            ln$Employed, as.matrix(ln[, c("GNP", "Population", "Year")]), c(1, 0, 0)),
  make_case("lakehuron_trend_ar2", "LakeHuron level on a linear trend (0, 1, ...), AR(2)",
            lh, trend, c(2, 0, 0)),
  make_case("lakehuron_trend_arma11", "LakeHuron level on a linear trend, ARMA(1,1)",
            lh, trend, c(1, 0, 1)))

write_fixture(list(
  description = paste("Standard errors of ML regression with ARMA errors on collinear or trending",
                      "regressors (R datasets freeny, longley, LakeHuron)."),
  source = paste(r_version(), "stats::arima(y, order, xreg, include.mean=TRUE, method='ML',",
                 "optim.control=list(reltol=1e-14, maxit=5000)); se = sqrt(diag(var.coef))"),
  conventions = paste("coef order: ar, ma, intercept, then xreg columns; theta(B) = 1 + theta B;",
                      "loglik with sigma2 concentrated"),
  cases = cases), ref_dir("standard_errors", "standard_errors_r.json"))
