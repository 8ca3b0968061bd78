# R's Nile series (annual flow of the Nile at Aswan, 1871-1970, 10^8 m^3) as a user would export
# it: write.csv of a data frame with a year column. Run from the repository root:
#   Rscript tests/reference/outliers/make_nile_csv.R
nile <- data.frame(year = as.integer(time(datasets::Nile)), flow = as.numeric(datasets::Nile))
write.csv(nile, file.path("tests", "reference", "outliers", "nile.csv"), row.names = FALSE)
