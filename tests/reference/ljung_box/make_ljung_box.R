# Ljung-Box portmanteau statistics from R's Box.test on the residuals of an MA(1) fit to
# diff(BJsales). Writes ljung_box_r.json. Run from the repository root:
#   Rscript tests/reference/ljung_box/make_ljung_box.R
source(file.path("tests", "reference", "common", "json_writer.R"))

bj <- load_bjsales()
stopifnot(identical(bj$sales, as.numeric(datasets::BJsales)))
dy <- diff(bj$sales)
fit <- arima(dy, order = c(0, 0, 1), method = "ML")
x <- as.numeric(residuals(fit))

tests <- list()
for (fitdf in c(1L, 0L)) for (k in c(5L, 10L, 20L)) {
  b <- Box.test(x, lag = k, type = "Ljung-Box", fitdf = fitdf)
  tests[[length(tests) + 1]] <- list(lag = k, fitdf = fitdf, statistic = unname(b$statistic),
                                     df = as.integer(b$parameter), p_value = b$p.value)
  cat(sprintf("lag=%2d fitdf=%d Q=%.10f df=%d p=%.10g\n", k, fitdf, b$statistic, b$parameter, b$p.value))
}

write_fixture(list(
  description = "Ljung-Box statistics of a fixed series (residuals of an MA(1) fit to diff(BJsales)).",
  source = paste(r_version(), "Box.test(x, lag=k, type='Ljung-Box', fitdf=m) for k in 5, 10, 20",
                 "and m in 1, 0; x = residuals(arima(diff(BJsales), order=c(0,0,1), method='ML'))"),
  formula = paste("Q = n (n + 2) sum_{j=1}^{k} r_j^2 / (n - j), r_j = acf of x (mean removed,",
                  "divisor n); df = k - fitdf; p = P(chi^2_df > Q)."),
  series_note = paste("x is stored in full (n = 149); the residuals are the Kalman-filter",
                      "innovations of R's MA(1)-with-mean fit, coefficients stored for information."),
  fit_coef_names = I(names(coef(fit))), fit_coef = I(unname(coef(fit))),
  n = length(x),
  x = I(x),
  tests = tests), ref_dir("ljung_box", "ljung_box_r.json"))
