# Small-sample behaviour of the exact ML estimate of an MA(1) coefficient, the baseline for the
# Series-M-like filter-start simulation (tests/model/filter_start_simulation_test.cpp): the noise
# of that simulation alone, w_t = 0.035 + (1 + theta B) a_t with theta = -0.55, sd(a) = 0.22 and
# n = 146 (the differenced rows inside its likelihood), fitted by
# arima(w, order = c(0, 0, 1), include.mean = TRUE, method = "ML") over R's own seeded draws.
# Writes filter_start_r.json. Run from the repository root:
#   Rscript tests/reference/filter_start/make_filter_start.R
source(file.path("tests", "reference", "common", "json_writer.R"))

theta <- -0.55
replications <- 4000L
set.seed(20240613)
est <- numeric(replications)
se <- numeric(replications)
for (i in seq_len(replications)) {
  w <- 0.035 + arima.sim(list(ma = theta), n = 146, sd = 0.22)
  fit <- arima(w, order = c(0, 0, 1), include.mean = TRUE, method = "ML")
  est[i] <- coef(fit)[["ma1"]]
  se[i] <- sqrt(fit$var.coef["ma1", "ma1"])
}
cat(sprintf("ma1: mean %.5f (truth %.2f, bias %.5f +- %.5f), sd %.5f, rms se %.5f\n",
            mean(est), theta, mean(est) - theta, sd(est) / sqrt(replications), sd(est),
            sqrt(mean(se^2))))
write_fixture(list(
  description = paste("Exact ML estimate of the MA(1) coefficient over seeded simulations of",
                      "w = 0.035 + (1 + theta B) a, theta = -0.55, sd(a) = 0.22, n = 146: its",
                      "mean (small-sample bias), spread and mean standard error."),
  source = paste(r_version(), "set.seed(20240613); arima.sim(list(ma = -0.55), n = 146,",
                 "sd = 0.22); arima(w, order = c(0, 0, 1), include.mean = TRUE, method = 'ML')"),
  conventions = "theta(B) = 1 + theta B (R's sign and ours)",
  theta = theta, n = 146L, replications = replications,
  ma_mean = mean(est), ma_sd = sd(est), ma_rms_se = sqrt(mean(se^2)),
  ma_bias_mc_se = sd(est) / sqrt(replications)),
  ref_dir("filter_start", "filter_start_r.json"))
