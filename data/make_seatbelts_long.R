# R datasets::Seatbelts in long format: the series front, rear and drivers (each with kms,
# petrol price and the law indicator as drivers) and vans_pre_law (van drivers killed, the first
# 150 months, where law is constant: a deliberately bad series). Rscript make_seatbelts_long.R
sb <- as.data.frame(Seatbelts)
tt <- time(Seatbelts)
date <- as.Date(sprintf("%d-%02d-01", floor(tt + 1e-9), round((tt - floor(tt + 1e-9)) * 12) + 1))
mk <- function(name, y, rows = seq_len(nrow(sb))) data.frame(series = name, month = date[rows],
  casualties = y[rows], kms = sb$kms[rows], petrol = sb$PetrolPrice[rows], law = sb$law[rows])
long <- rbind(mk("front", sb$front), mk("rear", sb$rear), mk("drivers", sb$drivers),
              mk("vans_pre_law", sb$VanKilled, 1:150))
write.csv(long, "seatbelts_long.csv", row.names = FALSE)  # run from data/
