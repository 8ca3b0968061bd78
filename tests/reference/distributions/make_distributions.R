# Reference values for src/evaluation/distributions.cpp from R's base stats functions
# (pnorm, qnorm, pt, qt, pchisq, pbeta), on a fixed grid that covers the centre and both tails.
# Run from the repository root: Rscript tests/reference/distributions/make_distributions.R
source(file.path("tests", "reference", "common", "json_writer.R"))

p_grid <- c(1e-300, 1e-100, 1e-20, 1e-10, 1e-6, 1e-4, 0.001, 0.01, 0.02425, 0.025, 0.05, 0.1,
            0.2, 0.3, 0.4, 0.45, 0.5, 0.55, 0.6, 0.7, 0.8, 0.9, 0.95, 0.975, 0.97575, 0.99,
            0.999, 0.9999, 1 - 1e-6, 1 - 1e-10)
z_grid <- c(-37, -20, -8, -5, -3, -1.959963984540054, -1.5, -1, -0.5, -0.1, 0, 0.1, 0.5, 1,
            1.2815515655446004, 2, 3, 5, 8)

t_x <- c(-40, -10, -4, -2.5, -1.3, -0.5, -0.01, 0, 0.01, 0.3, 1, 2.1, 3.7, 8, 60)
t_df <- c(0.5, 1, 2, 3, 4.5, 7, 10, 19, 30, 59, 120, 499, 2000)
t_cases <- expand.grid(x = t_x, df = t_df)
t_cases$cdf <- pt(t_cases$x, t_cases$df)
t_cases$two_sided <- 2 * pt(-abs(t_cases$x), t_cases$df)

tq_p <- c(1e-10, 1e-4, 0.005, 0.025, 0.1, 0.3, 0.5, 0.6, 0.9, 0.95, 0.975, 0.99, 0.9995)
tq_df <- c(0.5, 1, 2, 3.5, 7, 20, 145, 294, 5000)
tq_cases <- expand.grid(p = tq_p, df = tq_df)
tq_cases$value <- qt(tq_cases$p, tq_cases$df)

c_x <- c(0.001, 0.1, 0.5, 1, 2, 3.84, 5, 9.5, 15, 24, 31.4, 50, 80, 150, 400)
c_df <- c(0.5, 1, 2, 3, 5, 7.5, 10, 20, 24, 36, 100, 300)
c_cases <- expand.grid(x = c_x, df = c_df)
c_cases$upper <- pchisq(c_cases$x, c_cases$df, lower.tail = FALSE)

b_cases <- expand.grid(x = c(0.001, 0.05, 0.3, 0.5, 0.77, 0.99, 0.9999),
                       a = c(0.5, 1, 2.5, 40), b = c(0.5, 3, 17.5))
b_cases$value <- pbeta(b_cases$x, b_cases$a, b_cases$b)

write_fixture(list(
  source = paste("R base stats pnorm/qnorm/pt/qt/pchisq/pbeta;", r_version()),
  normal_quantile = list(p = p_grid, value = qnorm(p_grid)),
  normal_cdf = list(x = z_grid, value = pnorm(z_grid)),
  student_t = list(x = t_cases$x, df = t_cases$df, cdf = t_cases$cdf,
                   two_sided = t_cases$two_sided),
  student_t_quantile = list(p = tq_cases$p, df = tq_cases$df, value = tq_cases$value),
  chi_square_upper = list(x = c_cases$x, df = c_cases$df, value = c_cases$upper),
  incomplete_beta = list(x = b_cases$x, a = b_cases$a, b = b_cases$b, value = b_cases$value)
), ref_dir("distributions", "distributions.json"))
