# Exact Gaussian ARMA log-likelihood by brute force: build the n x n autocovariance matrix from
# the psi-weights and factor it. Independent of any Kalman filter; used as a third check.
#   e     : y - X beta (the ARMA noise), length n
#   ar, ma: expanded polynomials in R's sign convention
# Returns list(loglik, sigma2) with sigma^2 concentrated out (sigma2 = e' R^{-1} e / n).
dense_loglik <- function(e, ar = numeric(0), ma = numeric(0), n_psi = 20000L) {
  n <- length(e)
  psi <- c(1, ARMAtoMA(ar, ma, n_psi))
  # gamma_k / sigma^2 = sum_j psi_j psi_{j+k}; convolution through FFT would also do,
  # but direct sums for the first n lags are cheap enough here.
  m <- length(psi)
  g <- vapply(0:(n - 1), function(k) sum(psi[1:(m - k)] * psi[(1 + k):m]), 0)
  R <- toeplitz(g)
  U <- chol(R)
  z <- backsolve(U, e, transpose = TRUE)
  q <- sum(z^2)
  logdet <- 2 * sum(log(diag(U)))
  s2 <- q / n
  list(loglik = -0.5 * (n * log(2 * pi * s2) + logdet + n), sigma2 = s2)
}

# Multiply two polynomials given as R-convention coefficient vectors of (1 - a_1 B - ...) or
# (1 + b_1 B + ...). sign = -1 for AR style, +1 for MA style. Returns the expanded vector.
expand_seasonal <- function(nonseasonal, seasonal, period, sign) {
  p1 <- c(1, sign * nonseasonal)
  p2 <- 1
  if (length(seasonal)) {
    p2 <- numeric(period * length(seasonal) + 1)
    p2[1] <- 1
    p2[period * seq_along(seasonal) + 1] <- sign * seasonal
  }
  prod <- numeric(length(p1) + length(p2) - 1)
  for (i in seq_along(p1)) for (j in seq_along(p2))
    prod[i + j - 1] <- prod[i + j - 1] + p1[i] * p2[j]
  sign * prod[-1]
}
