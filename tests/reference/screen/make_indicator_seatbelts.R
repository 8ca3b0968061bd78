# Reference for the screen of an indicator column: R's Seatbelts, log(drivers) against the 0/1
# `law` column (a step from 0 to 1 in February 1983), both seasonally differenced (period 12).
# The differenced law is a 12-month block (not a step that stays, so no extra difference). An
# indicator is not
# prewhitened, so the screen's impulse estimate is v_k = r(k) s_w / s_u with
# R's ccf conventions (full-sample means, divisor n), and at lag 0 it equals the slope of a base-R
# regression lm(dw ~ du). Writes the data as CSV (tests need no R) and the fixture.
# Run from the repository root: Rscript tests/reference/screen/make_indicator_seatbelts.R
source(file.path("tests", "reference", "common", "json_writer.R"))
sb <- datasets::Seatbelts
drivers <- as.numeric(sb[, "drivers"])
law <- as.numeric(sb[, "law"])
tt <- time(sb)
month <- sprintf("%04d-%02d-01", floor(tt + 1e-9), round((tt - floor(tt + 1e-9)) * 12) + 1)
write.csv(data.frame(month = month, drivers = drivers, law = law),
          file.path("tests", "reference", "screen", "seatbelts.csv"), row.names = FALSE,
          quote = FALSE)
w <- diff(log(drivers), lag = 12)
u <- diff(law, lag = 12)
n <- length(w)
L <- 20L
cc <- ccf(w, u, lag.max = L, plot = FALSE)  # cor(w[t + k], u[t]) at lag k
stopifnot(all(cc$lag[, 1, 1] == -L:L))
sdn <- function(x) sqrt(mean((x - mean(x))^2))
r <- cc$acf[, 1, 1]
impulse <- r[(L + 1):(2 * L + 1)] * sdn(w) / sdn(u)
slope0 <- unname(coef(lm(w ~ u))[2])
write_fixture(list(
  source = paste("R", r_version(), "stats::ccf and stats::lm on diff(log(Seatbelts[, 'drivers']), 12)",
                 "and diff(Seatbelts[, 'law'], 12)"),
  max_lag = L,
  n = n,
  law_change_row = which(diff(law) != 0),  # 1-based row of the first 1 minus 1 = 0-based row
  ccf = r,
  impulse = impulse,
  lm_slope_lag0 = slope0
), file.path("tests", "reference", "screen", "indicator_seatbelts.json"))
