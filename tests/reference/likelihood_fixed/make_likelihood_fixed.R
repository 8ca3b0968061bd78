# Exact Gaussian log-likelihood at FIXED parameters (no optimisation), from R stats::arima,
# plus a dense-covariance brute-force check. Writes likelihood_fixed_r.json.
# Run from the repository root: Rscript tests/reference/likelihood_fixed/make_likelihood_fixed.R
source(file.path("tests", "reference", "common", "json_writer.R"))
source(file.path("tests", "reference", "common", "dense_loglik.R"))

bj <- load_bjsales()
stopifnot(identical(bj$sales, as.numeric(datasets::BJsales)),
          identical(bj$lead, as.numeric(datasets::BJsales.lead)))
ap <- load_airpassengers()
stopifnot(identical(ap$passengers, as.numeric(datasets::AirPassengers)))

dy <- diff(bj$sales)              # length 149
dx <- diff(bj$lead)
nd <- length(dy)
y_reg <- dy[4:nd]                 # drop the first 3 differenced values
x_reg <- dx[1:(nd - 3)]           # u_{t-3}: lag-3 differenced lead
z_air <- as.numeric(diff(diff(log(ap$passengers)), 12))  # length 131

run_case <- function(id, note, y, data_desc, p, q, P = 0, Q = 0, period = 1,
                     include_mean = TRUE, xreg = NULL, pars) {
  # pars: list(ar, ma, sar, sma, intercept, beta) in R's sign convention
  fixed <- c(pars$ar, pars$ma, pars$sar, pars$sma,
             if (include_mean) pars$intercept, pars$beta)
  fit_one <- function(ssinit) {
    arima(y, order = c(p, 0, q),
          seasonal = list(order = c(P, 0, Q), period = period),
          xreg = xreg, include.mean = include_mean, method = "ML",
          fixed = fixed, transform.pars = FALSE, SSinit = ssinit)
  }
  fg <- fit_one("Gardner1980")
  fr <- fit_one("Rossignol2011")
  ar_full <- expand_seasonal(pars$ar, pars$sar, period, -1)
  ma_full <- expand_seasonal(pars$ma, pars$sma, period, +1)
  e <- y - (if (include_mean) pars$intercept else 0) -
       (if (!is.null(xreg)) as.numeric(as.matrix(xreg) %*% pars$beta) else 0)
  dn <- dense_loglik(e, ar_full, ma_full)
  out <- list(
    id = id, note = note,
    model = list(p = as.integer(p), q = as.integer(q), P = as.integer(P), Q = as.integer(Q),
                 period = as.integer(period), include_mean = include_mean,
                 n_xreg = as.integer(if (is.null(xreg)) 0 else NCOL(xreg))),
    data = data_desc,
    n = as.integer(length(y)),
    y = I(y),
    xreg = if (is.null(xreg)) NULL else I(as.numeric(xreg)),
    params = list(ar = I(pars$ar), ma = I(pars$ma), sar = I(pars$sar), sma = I(pars$sma),
                  intercept = if (include_mean) pars$intercept else NULL,
                  beta = I(pars$beta)),
    ar_expanded = I(ar_full), ma_expanded = I(ma_full),
    r_fixed_vector = I(fixed),
    r_fixed_vector_names = I(names(coef(fg))),
    r_loglik = fg$loglik,
    r_sigma2 = fg$sigma2,
    r_loglik_rossignol2011 = fr$loglik,
    r_sigma2_rossignol2011 = fr$sigma2,
    r_aic = fg$aic,
    dense_loglik = dn$loglik,
    dense_sigma2 = dn$sigma2)
  out$params <- out$params[!vapply(out$params, is.null, TRUE)]
  out <- out[!vapply(out, is.null, TRUE)]
  out
}

e0 <- numeric(0)
desc_a <- "y = diff(BJsales) (149 values), t = 2..150 of data/bjsales.csv column sales"
desc_c <- paste("y = diff(BJsales)[4:149] (146 values); xreg = diff(BJsales.lead)[1:146],",
                "i.e. the differenced lead lagged 3 (x_{t-3}); first 3 differenced obs dropped")
desc_d <- "y = diff(diff(log(AirPassengers)), lag = 12) (131 values), from data/airpassengers.csv"

cases <- list()
add <- function(...) cases[[length(cases) + 1]] <<- run_case(...)

# (a) ARMA(1,1) with mean on diff(BJsales)
a_pars <- list(c(0.8383, -0.6098, 0.4004), c(0.5, 0.3, 0.0), c(-0.4, 0.7, 1.0),
               c(0.95, -0.9, 0.4), c(0.0, 0.0, 0.0))
a_notes <- c("near the ML optimum", "generic interior point", "negative AR, large MA",
             "near cancellation, AR close to unit root", "white noise with zero mean (closed form: -n/2 (log(2 pi mean(y^2)) + 1))")
for (i in seq_along(a_pars)) {
  v <- a_pars[[i]]
  add(sprintf("arma11_mean_%d", i), a_notes[i], dy, desc_a, 1, 1,
      pars = list(ar = v[1], ma = v[2], sar = e0, sma = e0, intercept = v[3], beta = e0))
}
# (b) ARMA(2,1) with mean
b_pars <- list(c(0.7723, 0.0439, -0.5615, 0.4004), c(1.2, -0.5, 0.3, 0.2),
               c(-0.3, 0.4, -0.8, 0.5))
b_notes <- c("near the ML optimum", "complex AR roots", "real AR roots of both signs, strong MA")
for (i in seq_along(b_pars)) {
  v <- b_pars[[i]]
  add(sprintf("arma21_mean_%d", i), b_notes[i], dy, desc_a, 2, 1,
      pars = list(ar = v[1:2], ma = v[3], sar = e0, sma = e0, intercept = v[4], beta = e0))
}
# (c) regression with ARMA(1,1) errors: intercept + lag-3 differenced lead
c_pars <- list(c(0.6002, 0.0783, 0.3636, 2.7684), c(0.3, 0.5, 0.0, 2.5),
               c(0.8, -0.3, 0.5, 3.0))
c_notes <- c("near the ML optimum", "generic interior point", "strong AR, negative MA")
for (i in seq_along(c_pars)) {
  v <- c_pars[[i]]
  add(sprintf("regarma11_%d", i), c_notes[i], y_reg, desc_c, 1, 1,
      xreg = matrix(x_reg, ncol = 1, dimnames = list(NULL, "lead_lag3")),
      pars = list(ar = v[1], ma = v[2], sar = e0, sma = e0, intercept = v[3], beta = v[4]))
}
# (d) seasonal MA(1) x SMA(1)_12 without mean
d_pars <- list(c(-0.4018, -0.5569), c(0.0, 0.0), c(-0.8, -0.9), c(0.3, 0.5))
d_notes <- c("near the ML optimum", "white noise (closed form)", "near non-invertibility",
             "positive MA coefficients")
for (i in seq_along(d_pars)) {
  v <- d_pars[[i]]
  add(sprintf("airline_sma_%d", i), d_notes[i], z_air, desc_d, 0, 1, 0, 1, 12,
      include_mean = FALSE,
      pars = list(ar = e0, ma = v[1], sar = e0, sma = v[2], beta = e0))
}

maxrel <- function(a, b) max(abs(a - b) / abs(b))
ll_g <- vapply(cases, function(c) c$r_loglik, 0)
ll_r <- vapply(cases, function(c) c$r_loglik_rossignol2011, 0)
ll_d <- vapply(cases, function(c) c$dense_loglik, 0)
cat("max rel diff R(Gardner) vs dense:", maxrel(ll_g, ll_d), "\n")
cat("max rel diff R(Rossignol) vs dense:", maxrel(ll_r, ll_d), "\n")
for (c in cases) cat(sprintf("%-16s n=%3d  R=%.10f  Ross=%.10f  dense=%.10f\n", c$id, c$n,
                             c$r_loglik, c$r_loglik_rossignol2011, c$dense_loglik))

write_fixture(list(
  description = paste("Exact Gaussian log-likelihood of (regression with) stationary ARMA noise at",
                      "FIXED parameters, computed on already differenced data."),
  source = paste(r_version(), "stats::arima(y, order=c(p,0,q), seasonal=list(order=c(P,0,Q), period=S),",
                 "xreg=, include.mean=, method='ML', fixed=r_fixed_vector, transform.pars=FALSE,",
                 "SSinit='Gardner1980' (default) or 'Rossignol2011'); $loglik, $sigma2"),
  conventions = paste("phi(B) = 1 - phi_1 B - ...; theta(B) = 1 + theta_1 B + ...;",
                      "seasonal factors multiply (ar_expanded/ma_expanded are the full polynomials",
                      "in the same sign convention); model: y_t = intercept + xreg_t * beta + n_t,",
                      "n_t ARMA. loglik = -n/2 log(2 pi sigma2) - 1/2 log det R - n/2 with",
                      "sigma2 = SSR/n concentrated (R's arima definition), n = length(y)."),
  dense_check = paste("dense_loglik: the same quantity from an n x n Toeplitz autocovariance",
                      "matrix (psi-weights truncated at 20000 lags) and its Cholesky factor",
                      "(tests/reference/common/dense_loglik.R)."),
  max_rel_diff_r_gardner_vs_dense = maxrel(ll_g, ll_d),
  max_rel_diff_r_rossignol_vs_dense = maxrel(ll_r, ll_d),
  cases = cases), ref_dir("likelihood_fixed", "likelihood_fixed_r.json"))
