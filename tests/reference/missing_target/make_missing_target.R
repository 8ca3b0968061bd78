# Exact ML fits with missing target values: R's arima with NA in the response (state-space
# likelihood: the Kalman filter skips the update at an NA), on two datasets R ships with named
# rows removed. Both cases have d = 0, so R's likelihood is exact (no diffuse prior).
# Run from the repository root:
#   Rscript tests/reference/missing_target/make_missing_target.R
source(file.path("tests", "reference", "common", "json_writer.R"))

fit_case <- function(id, y, removed, order, xreg = NULL, xreg_name = NULL) {
  y_na <- as.numeric(y)
  y_na[removed] <- NA
  fit <- arima(y_na, order = order, xreg = xreg, method = "ML",
               optim.control = list(reltol = 1e-14, maxit = 2000))
  co <- coef(fit)
  se <- sqrt(diag(fit$var.coef))
  list(id = id,
       removed_rows_1based = I(as.integer(removed)),
       y = I(y_na),
       xreg = if (is.null(xreg)) I(numeric(0)) else I(as.numeric(xreg)),
       xreg_name = if (is.null(xreg_name)) "" else xreg_name,
       order = I(as.integer(order)),
       coef_names = I(names(co)),
       coef = I(unname(co)),
       se = I(unname(se)),
       loglik = fit$loglik,
       sigma2 = fit$sigma2,
       nobs = fit$nobs)
}

# LakeHuron (annual lake level, 98 values): ARMA(1,1) with a mean, five values removed.
lh <- fit_case("lakehuron_arma11_na", LakeHuron, c(10, 25, 26, 60, 90), c(1, 0, 1))
# Nile (annual flow, 100 values): AR(1) with a mean and a level shift from 1899 (row 29),
# five values removed, one run of three.
step <- as.numeric(time(Nile) >= 1899)
nile <- fit_case("nile_step_ar1_na", Nile, c(5, 40, 41, 42, 77), c(1, 0, 0), cbind(step = step), "step")
# AirPassengers, log, differenced once regularly and seasonally beforehand (so d = 0 here):
# the airline noise ARMA(0,1)(0,1)_12 without a mean, four values of the differenced series
# removed.
w <- as.numeric(diff(diff(log(AirPassengers)), lag = 12))
w_na <- w
removed <- c(20, 50, 51, 100)
w_na[removed] <- NA
fa <- arima(w_na, order = c(0, 0, 1), seasonal = list(order = c(0, 0, 1), period = 12),
            include.mean = FALSE, method = "ML",
            optim.control = list(reltol = 1e-14, maxit = 2000))
air <- list(id = "airline_w_na", removed_rows_1based = I(as.integer(removed)), y = I(w_na),
            xreg = I(numeric(0)), xreg_name = "", order = I(c(0L, 0L, 1L)),
            coef_names = I(names(coef(fa))), coef = I(unname(coef(fa))),
            se = I(unname(sqrt(diag(fa$var.coef)))), loglik = fa$loglik, sigma2 = fa$sigma2,
            nobs = fa$nobs)

write_fixture(list(
  description = "R arima(method = 'ML') with NA in the response: exact likelihood of the observed values",
  source = "R stats::arima, datasets LakeHuron, Nile, AirPassengers; rows removed as listed",
  r_version = r_version(),
  cases = list(lh, nile, air)), ref_dir("missing_target", "missing_target_r.json"))
cat("loglik:", lh$loglik, nile$loglik, air$loglik, "\n")
