# Maximum-likelihood optima from R stats::arima. Writes ml_optimum_r.json.
# Run from the repository root: Rscript tests/reference/ml_optimum/make_ml_optimum.R
source(file.path("tests", "reference", "common", "json_writer.R"))

bj <- load_bjsales()
ap <- load_airpassengers()
stopifnot(identical(bj$sales, as.numeric(datasets::BJsales)),
          identical(bj$lead, as.numeric(datasets::BJsales.lead)),
          identical(ap$passengers, as.numeric(datasets::AirPassengers)))

# Tight convergence so the recorded optimum is a property of the data, not of optim's stopping
# rule; the default-control estimates are recorded next to it for information.
tight <- list(reltol = 1e-13, maxit = 2000)

describe_fit <- function(label, call_text, fit, fit_default, notes) {
  list(label = label, call = call_text, notes = notes,
       n_used = as.integer(fit$nobs),
       coef_names = I(names(coef(fit))),
       coef = I(unname(coef(fit))),
       se = I(unname(sqrt(diag(fit$var.coef)))),
       var_coef = unname(fit$var.coef),
       loglik = fit$loglik,
       sigma2 = fit$sigma2,
       aic = fit$aic,
       optim_convergence_code = as.integer(fit$code),
       default_control = list(coef = I(unname(coef(fit_default))), loglik = fit_default$loglik,
                              sigma2 = fit_default$sigma2))
}

logap <- ts(log(ap$passengers), start = c(1949, 1), frequency = 12)
z <- diff(diff(logap), lag = 12)

fits <- list()
# (a1) undifferenced log series: R puts a diffuse prior (variance kappa = 1e6) on the 13
# differencing states and drops the observations whose innovation variance is >= 1e4 from the
# likelihood, so the result approximates the exact likelihood of the differenced data.
a1 <- arima(logap, order = c(0, 1, 1), seasonal = list(order = c(0, 1, 1), period = 12),
            optim.control = tight)
a1d <- arima(logap, order = c(0, 1, 1), seasonal = list(order = c(0, 1, 1), period = 12))
fits$airline_undifferenced <- describe_fit("airline_undifferenced",
  paste("arima(log(AirPassengers), order=c(0,1,1), seasonal=list(order=c(0,1,1), period=12),",
        "optim.control=list(reltol=1e-13, maxit=2000))  [method default = 'CSS-ML']"),
  a1, a1d,
  paste("Undifferenced series (n = 144, n_used = 131). Differencing handled inside the state",
        "space with a diffuse prior kappa = 1e6 on the differencing states (R's arima); the",
        "likelihood is therefore close to, but not exactly, the exact likelihood of the",
        "differenced data (see airline_differenced)."))
# (a2) differenced data, stationary exact likelihood.
a2 <- arima(z, order = c(0, 0, 1), seasonal = list(order = c(0, 0, 1), period = 12),
            include.mean = FALSE, method = "ML", optim.control = tight)
a2d <- arima(z, order = c(0, 0, 1), seasonal = list(order = c(0, 0, 1), period = 12),
             include.mean = FALSE, method = "ML")
fits$airline_differenced <- describe_fit("airline_differenced",
  paste("arima(diff(diff(log(AirPassengers)), 12), order=c(0,0,1), seasonal=list(order=c(0,0,1),",
        "period=12), include.mean=FALSE, method='ML', optim.control=list(reltol=1e-13, maxit=2000))"),
  a2, a2d, "Exact stationary likelihood of the 131 differenced values.")

# (b) regression with MA(1) errors.
dy <- diff(bj$sales); dx <- diff(bj$lead); nd <- length(dy)
y <- dy[4:nd]
x <- matrix(dx[1:(nd - 3)], ncol = 1, dimnames = list(NULL, "lead_lag3"))
b1 <- arima(y, order = c(0, 0, 1), xreg = x, include.mean = TRUE, method = "ML",
            optim.control = tight)
b1d <- arima(y, order = c(0, 0, 1), xreg = x, include.mean = TRUE, method = "ML")
fits$regression_ma1 <- describe_fit("regression_ma1",
  paste("arima(y, order=c(0,0,1), xreg=x, include.mean=TRUE, method='ML',",
        "optim.control=list(reltol=1e-13, maxit=2000))"),
  b1, b1d,
  paste("y = diff(BJsales)[4:149], x = diff(BJsales.lead)[1:146] (the differenced lead lagged",
        "3, first 3 differenced observations dropped), n = 146. Model y_t = intercept + beta x_t",
        "+ (1 + theta B) a_t."))

# The exact differenced-data likelihood evaluated at the undifferenced fit's coefficients, to
# size the effect of R's diffuse-prior approximation.
chk <- arima(z, order = c(0, 0, 1), seasonal = list(order = c(0, 0, 1), period = 12),
             include.mean = FALSE, method = "ML", fixed = coef(a1), transform.pars = FALSE)

for (f in fits) cat(sprintf("%-24s n=%d loglik=%.12f sigma2=%.12g coef=%s\n", f$label, f$n_used,
                            f$loglik, f$sigma2, paste(sprintf("%.8f", f$coef), collapse = " ")))
cat(sprintf("differenced loglik at undifferenced coef: %.12f (undiff loglik %.12f)\n",
            chk$loglik, a1$loglik))

write_fixture(list(
  description = "Maximum-likelihood estimates from R stats::arima with tight optimiser tolerances.",
  source = r_version(),
  conventions = paste("theta(B) = 1 + theta_1 B, Theta(B^12) = 1 + Theta_1 B^12 (ma1, sma1);",
                      "loglik is R's (full Gaussian with 2 pi, sigma2 = SSR/n_used concentrated);",
                      "se = sqrt(diag(var.coef)), var.coef = inverse of the numerical Hessian of",
                      "-loglik (R's); sigma2 is not among coef. Data: tests/reference/data/*.csv."),
  data = list(
    airline = "z = diff(diff(log(passengers)), 12) of data/airpassengers.csv (131 values)",
    regression = paste("y = diff(sales)[4:149], x = diff(lead)[1:146] of data/bjsales.csv",
                       "(146 values each; x_t is the differenced lead at t-3)")),
  fits = fits,
  airline_exact_loglik_at_undifferenced_coef = chk$loglik,
  airline_exact_sigma2_at_undifferenced_coef = chk$sigma2), ref_dir("ml_optimum", "ml_optimum_r.json"))
