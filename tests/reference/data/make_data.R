# Writes R's built-in datasets as CSV so tests do not need R.
# Run from the repository root: Rscript tests/reference/data/make_data.R
bj <- data.frame(t = seq_along(datasets::BJsales),
                 sales = as.numeric(datasets::BJsales),
                 lead = as.numeric(datasets::BJsales.lead))
write.csv(bj, file.path("tests", "reference", "data", "bjsales.csv"), row.names = FALSE, quote = FALSE)
ap <- data.frame(t = seq_along(datasets::AirPassengers),
                 passengers = as.numeric(datasets::AirPassengers))
write.csv(ap, file.path("tests", "reference", "data", "airpassengers.csv"), row.names = FALSE, quote = FALSE)
cat("wrote bjsales.csv (", nrow(bj), "rows) and airpassengers.csv (", nrow(ap), "rows)\n")
