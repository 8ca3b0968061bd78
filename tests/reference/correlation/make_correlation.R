# Sample autocorrelations, partial autocorrelations and cross-correlations of the differenced
# Series M pair, and the Yule-Walker AR order chosen by AIC for the differenced lead.
# Writes correlation_r.json. Run from the repository root:
#   Rscript tests/reference/correlation/make_correlation.R
source(file.path("tests", "reference", "common", "json_writer.R"))

bj <- load_bjsales()
stopifnot(identical(bj$sales, as.numeric(datasets::BJsales)),
          identical(bj$lead, as.numeric(datasets::BJsales.lead)))
dy <- diff(bj$sales); dx <- diff(bj$lead)

a <- acf(dy, lag.max = 20, type = "correlation", plot = FALSE)
p <- pacf(dy, lag.max = 20, plot = FALSE)
cc <- ccf(dx, dy, lag.max = 15, type = "correlation", plot = FALSE)
ay <- ar.yw(dx, aic = TRUE, order.max = 10)
ccl <- as.numeric(cc$lag); ccv <- as.numeric(cc$acf)
cat("ccf peak at lag", ccl[which.max(abs(ccv))], "value", ccv[which.max(abs(ccv))], "\n")
cat("ar.yw order", ay$order, "ar", ay$ar, "\n")

write_fixture(list(
  description = "acf / pacf of diff(BJsales), ccf of (diff(BJsales.lead), diff(BJsales)), ar.yw of diff(BJsales.lead).",
  source = paste(r_version(), "acf(dy, lag.max=20, type='correlation', plot=FALSE);",
                 "pacf(dy, lag.max=20, plot=FALSE); ccf(dx, dy, lag.max=15, type='correlation',",
                 "plot=FALSE); ar.yw(dx, aic=TRUE, order.max=10)"),
  data = "dy = diff(sales), dx = diff(lead) of data/bjsales.csv (n = 149 each)",
  conventions = paste("acf: r_k = c_k / c_0, c_k = (1/n) sum_{t=1}^{n-k} (y_t - ybar)(y_{t+k} - ybar)",
                      "(divisor n, mean removed). pacf: Durbin-Levinson from the acf, lags 1..20.",
                      "ccf(x, y) at lag k estimates cor(x_{t+k}, y_t) = c_xy(k) / sqrt(c_xx(0) c_yy(0)),",
                      "c_xy(k) = (1/n) sum_t (x_{t+k} - xbar)(y_t - ybar); here x = dx (lead), y = dy",
                      "(sales), so the lead LEADING sales by 3 periods (x_{t-3} drives y_t) shows up at",
                      "NEGATIVE lag k = -3."),
  n = length(dy),
  acf = list(lag = I(as.numeric(a$lag)), value = I(as.numeric(a$acf))),
  pacf = list(lag = I(as.numeric(p$lag)), value = I(as.numeric(p$acf))),
  ccf_lead_sales = list(x = "diff(lead)", y = "diff(sales)",
                        lag = I(ccl), value = I(ccv)),
  approx_band_2_over_sqrt_n = 2 / sqrt(length(dy)),
  ar_yw_lead = list(
    call = "ar.yw(dx, aic=TRUE, order.max=10)",
    order = as.integer(ay$order),
    ar = I(as.numeric(ay$ar)),
    var_pred = ay$var.pred,
    x_mean = ay$x.mean,
    aic_minus_min_orders_0_to_10 = I(as.numeric(ay$aic)),
    note = paste("R's ar.yw: demeaned series, Yule-Walker with divisor n; var.pred is the",
                 "innovations variance scaled by n/(n - (order + 1)); aic is AIC minus its minimum",
                 "over orders 0..10."))), ref_dir("correlation", "correlation_r.json"))
