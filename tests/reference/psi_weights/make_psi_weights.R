# psi-weights (MA(infinity) coefficients) from R's ARMAtoMA for several models, seasonal ones
# expanded to full polynomials. Writes psi_weights_r.json.
# Run from the repository root: Rscript tests/reference/psi_weights/make_psi_weights.R
source(file.path("tests", "reference", "common", "json_writer.R"))
source(file.path("tests", "reference", "common", "dense_loglik.R"))  # expand_seasonal()

lag_max <- 30L
model <- function(name, ar = numeric(0), ma = numeric(0), sar = numeric(0), sma = numeric(0),
                  period = 1L, ar_extra = NULL, note = "") {
  ar_full <- expand_seasonal(ar, sar, period, -1)
  ma_full <- expand_seasonal(ma, sma, period, +1)
  if (!is.null(ar_extra)) ar_full <- ar_extra
  list(name = name, note = note,
       nonseasonal = list(ar = I(ar), ma = I(ma)),
       seasonal = list(ar = I(sar), ma = I(sma), period = as.integer(period)),
       ar_expanded = I(ar_full), ma_expanded = I(ma_full),
       psi_1_to_30 = I(ARMAtoMA(ar_full, ma_full, lag_max)))
}

models <- list(
  model("ar1", ar = 0.9, note = "closed form psi_j = 0.9^j"),
  model("ar2", ar = c(1.2, -0.5), note = "complex roots, damped oscillation"),
  model("ma2", ma = c(0.4, 0.3), note = "psi = (0.4, 0.3, 0, 0, ...)"),
  model("arma11", ar = 0.8, ma = -0.3, note = "closed form psi_j = (phi + theta) phi^(j-1)"),
  model("arma22", ar = c(0.5, 0.3), ma = c(0.4, -0.2)),
  model("sarma_101_101_4", ar = 0.5, ma = 0.4, sar = 0.3, sma = -0.6, period = 4L,
        note = "(1 - 0.5B)(1 - 0.3B^4) n_t = (1 + 0.4B)(1 - 0.6B^4) a_t"),
  model("sma_001_001_12", ma = -0.4, sma = -0.6, period = 12L,
        note = "(1 - 0.4B)(1 - 0.6B^12); psi equals the expanded MA coefficients then zeros"))
# Airline model with its differencing folded into the AR side: (1 - B)(1 - B^12) is
# 1 - B - B^12 + B^13, i.e. ar = (1, 0 x 10, 1, -1) in R's sign; psi-weights of the
# nonstationary operator (used for forecast error variances).
ar_air <- numeric(13); ar_air[1] <- 1; ar_air[12] <- 1; ar_air[13] <- -1
air <- model("airline_011_011_12_with_differencing", ma = -0.4, sma = -0.6, period = 12L,
             ar_extra = ar_air,
             note = paste("psi of (1 - 0.4B)(1 - 0.6B^12) / ((1 - B)(1 - B^12)); ar_expanded is",
                          "the differencing operator; nonseasonal/seasonal list only the MA parts"))
models[[length(models) + 1]] <- air

# Closed-form checks of the recursion's use.
stopifnot(max(abs(models[[1]]$psi_1_to_30 - 0.9^(1:30))) < 1e-14,
          max(abs(models[[4]]$psi_1_to_30 - 0.5 * 0.8^(0:29))) < 1e-14,
          max(abs(models[[3]]$psi_1_to_30 - c(0.4, 0.3, rep(0, 28)))) == 0)

write_fixture(list(
  description = "psi-weights psi_1..psi_30 (psi_0 = 1 is not included) of ARMA models.",
  source = paste(r_version(), "stats::ARMAtoMA(ar = ar_expanded, ma = ma_expanded, lag.max = 30)"),
  conventions = paste("phi(B) = 1 - sum ar_expanded[j] B^j, theta(B) = 1 + sum ma_expanded[j] B^j;",
                      "psi(B) = theta(B) / phi(B) = 1 + sum psi_j B^j. Seasonal factors multiply:",
                      "ar_expanded are the coefficients of phi(B) Phi(B^S), same sign convention."),
  models = models), ref_dir("psi_weights", "psi_weights_r.json"))
