# R's monthly datasets exported as a user gets them: write.csv of a data frame with the month as
# YYYY-MM text (quoted by write.csv), and the same values with an integer index.
# Run from the repository root:
#   Rscript tests/reference/calendar/make_calendar.R
months <- function(x) format(seq(as.Date(sprintf("%d-%02d-01", start(x)[1], start(x)[2])),
                                 by = "month", length.out = length(time(x))), "%Y-%m")
out <- file.path("tests", "reference", "calendar")
ap <- data.frame(month = months(AirPassengers), passengers = as.numeric(AirPassengers))
write.csv(ap, file.path(out, "airpassengers_monthly.csv"), row.names = FALSE)
sb <- data.frame(month = months(Seatbelts), Seatbelts)
write.csv(sb, file.path(out, "seatbelts_monthly.csv"), row.names = FALSE)
# freeny's quarterly stamps as R prints them (1962Q2 ...).
fr <- data.frame(quarter = sprintf("%dQ%d", floor(time(freeny.y) + 1e-9),
                                   cycle(freeny.y)), y = as.numeric(freeny.y))
write.csv(fr, file.path(out, "freeny_quarterly.csv"), row.names = FALSE)
cat("wrote", nrow(ap), nrow(sb), nrow(fr), "rows\n")
