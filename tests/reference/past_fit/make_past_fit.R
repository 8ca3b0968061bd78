# One-step predictions (fitted values) of regressions with ARMA errors, from R's own Kalman
# forecaster: for each t, arima() on the rows before t with every coefficient fixed at the ML
# fit, then predict(n.ahead = 1, newxreg = row t). Writes past_fit_r.json.
# Run from the repository root: Rscript tests/reference/past_fit/make_past_fit.R
source(file.path("tests", "reference", "common", "json_writer.R"))

one_step <- function(y, X, order, mean, coef) {
  n <- length(y)
  pred <- numeric(n)
  k <- ncol(X)
  beta <- tail(coef, k)
  pred[1] <- (if (mean) coef[["intercept"]] else 0) + sum(beta * X[1, ])
  for (t in 2:n) {
    f <- arima(y[1:(t - 1)], order = order, xreg = X[1:(t - 1), , drop = FALSE],
               include.mean = mean, method = "ML", fixed = unname(coef), transform.pars = FALSE)
    pred[t] <- as.numeric(predict(f, n.ahead = 1, newxreg = X[t, , drop = FALSE])$pred)
  }
  pred
}

# Case 1: BJsales, sales on the lead three months earlier, both differenced once, ARMA(1,1)
# noise, no constant. Sample: data rows 5..150 (1-based), differenced pairs dy[4..149] with
# dx[1..146]. Level fitted value = sales[row - 1] + predicted difference.
bj <- load_bjsales()
dy <- diff(bj$sales); dx <- diff(bj$lead)
y1 <- dy[4:149]; X1 <- matrix(dx[1:146], ncol = 1, dimnames = list(NULL, "lead"))
f1 <- arima(y1, order = c(1, 0, 1), xreg = X1, include.mean = FALSE, method = "ML",
            optim.control = list(reltol = 1e-13, maxit = 2000))
p1 <- one_step(y1, X1, c(1, 0, 1), FALSE, coef(f1))
fitted1 <- bj$sales[4:149] + p1

# Case 2: Seatbelts, drivers on PetrolPrice and the law step (both at lag 0), ARMA(1,1) noise
# with a constant, no differencing; all 192 months.
sb <- read.csv(ref_dir("calendar", "seatbelts_monthly.csv"))
y2 <- as.numeric(sb$drivers)
X2 <- cbind(PetrolPrice = sb$PetrolPrice, law = as.numeric(sb$law))
f2 <- arima(y2, order = c(1, 0, 1), xreg = X2, include.mean = TRUE, method = "ML",
            optim.control = list(reltol = 1e-13, maxit = 2000))
p2 <- one_step(y2, X2, c(1, 0, 1), TRUE, coef(f2))
cat(sprintf("case 1: %s\ncase 2: %s\n", paste(format(coef(f1), digits = 8), collapse = " "),
            paste(format(coef(f2), digits = 8), collapse = " ")))
cat(sprintf("max |fitted - (y - residuals)| after row 20: %.3g, %.3g\n",
            max(abs(p1 - (y1 - residuals(f1)))[20:146]),
            max(abs(p2 - (y2 - residuals(f2)))[20:192])))

write_fixture(list(
  description = paste("One-step predictions of regressions with ARMA(1,1) errors at the ML",
                      "fit: R's predict(n.ahead = 1) from arima() on the rows before each row,",
                      "coefficients fixed."),
  source = paste(r_version(), "arima(y[1:(t-1)], order=c(1,0,1), xreg=X[1:(t-1),],",
                 "fixed=coef, transform.pars=FALSE, method='ML'); predict(f, 1, newxreg=X[t,])"),
  conventions = "R's MA sign (1 + ma1 B), as core/spec.h; sigma2 concentrated (SSR/n).",
  bjsales = list(
    data = "tests/reference/data/bjsales.csv; sales on lead at lag 3, d = 1, no constant",
    rows = I(5:150), coef_names = I(names(coef(f1))), coef = I(unname(coef(f1))),
    sigma2 = f1$sigma2, fitted = I(fitted1), std_residuals = I(as.numeric(residuals(f1)))),
  seatbelts = list(
    data = "tests/reference/calendar/seatbelts_monthly.csv; drivers on PetrolPrice and law",
    rows = I(1:192), coef_names = I(names(coef(f2))), coef = I(unname(coef(f2))),
    sigma2 = f2$sigma2, fitted = I(p2), std_residuals = I(as.numeric(residuals(f2))))),
  ref_dir("past_fit", "past_fit_r.json"))
