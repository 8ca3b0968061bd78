# Nile level shift: R's arima (exact ML) of the annual Nile flow with AR(1) noise, a mean and a
# step from 1899 as a regressor: the model lagsieve's outlier detection arrives at on its own
# (published analyses place the change in 1898-1899: Cobb 1978, Biometrika 65; Balke 1993,
# J. Business & Economic Statistics 11). Writes nile_level_shift.json. Run from the repository
# root:  Rscript tests/reference/outliers/make_nile.R
source(file.path("tests", "reference", "common", "json_writer.R"))
flow <- as.numeric(datasets::Nile)
year <- as.integer(time(datasets::Nile))
step <- as.numeric(year >= 1899)
fit <- arima(flow, order = c(1, 0, 0), xreg = matrix(step, ncol = 1, dimnames = list(NULL, "step")),
             include.mean = TRUE, method = "ML",
             optim.control = list(reltol = 1e-13, maxit = 2000))
se <- sqrt(diag(fit$var.coef))
out <- list(
  source = "R datasets::Nile; stats::arima(order = c(1, 0, 0), xreg = step from 1899, method = 'ML')",
  first_year = year[1], step_year = 1899L, n = length(flow),
  ar1 = unname(coef(fit)["ar1"]), ar1_se = unname(se["ar1"]),
  intercept = unname(coef(fit)["intercept"]), intercept_se = unname(se["intercept"]),
  step = unname(coef(fit)["step"]), step_se = unname(se["step"]),
  loglik = fit$loglik, sigma2 = fit$sigma2)
write_fixture(out, file.path("tests", "reference", "outliers", "nile_level_shift.json"))
