# Minimal JSON writer for reference fixtures (jsonlite is not assumed to be installed).
# Numbers are printed with 17 significant digits ("%.17g") so doubles round-trip exactly.
# Usage: source("tests/reference/common/json_writer.R"); write_fixture(list(...), path)

json_num <- function(x) {
  out <- character(length(x))
  for (i in seq_along(x)) {
    v <- x[i]
    if (is.na(v)) out[i] <- "null"
    else if (is.infinite(v)) stop("infinite value cannot be written to JSON")
    else if (is.integer(v)) out[i] <- sprintf("%d", v)
    else out[i] <- sprintf("%.17g", v)
  }
  out
}

json_str <- function(s) {
  s <- gsub("\\\\", "\\\\\\\\", s)
  s <- gsub("\"", "\\\\\"", s)
  s <- gsub("\n", "\\\\n", s)
  paste0("\"", s, "\"")
}

# Vectors of length != 1, or wrapped in I(), become JSON arrays; length-1 unwrapped atoms
# become scalars. Named lists become objects, unnamed lists arrays. Matrices become arrays of
# rows.
to_json <- function(x, indent = 0) {
  pad <- strrep("  ", indent)
  pad1 <- strrep("  ", indent + 1)
  if (is.null(x)) return("null")
  if (is.matrix(x)) {
    rows <- lapply(seq_len(nrow(x)), function(i) I(unname(x[i, ])))
    return(to_json(rows, indent))
  }
  if (is.list(x)) {
    if (length(x) == 0) return(if (is.null(names(x))) "[]" else "{}")
    if (!is.null(names(x)) && all(names(x) != "")) {
      items <- vapply(names(x), function(k)
        paste0(pad1, json_str(k), ": ", to_json(x[[k]], indent + 1)), "")
      return(paste0("{\n", paste(items, collapse = ",\n"), "\n", pad, "}"))
    }
    items <- vapply(seq_along(x), function(i) paste0(pad1, to_json(x[[i]], indent + 1)), "")
    return(paste0("[\n", paste(items, collapse = ",\n"), "\n", pad, "]"))
  }
  as_array <- inherits(x, "AsIs") || length(x) != 1
  x <- unclass(x)
  names(x) <- NULL
  vals <- if (is.character(x)) json_str(x)
          else if (is.logical(x)) ifelse(is.na(x), "null", ifelse(x, "true", "false"))
          else json_num(x)
  if (as_array) {
    # Wrap long numeric arrays over several lines to keep diffs readable.
    if (length(vals) <= 4) return(paste0("[", paste(vals, collapse = ", "), "]"))
    chunks <- split(vals, ceiling(seq_along(vals) / 4))
    lines <- vapply(chunks, function(ch) paste0(pad1, paste(ch, collapse = ", ")), "")
    return(paste0("[\n", paste(lines, collapse = ",\n"), "\n", pad, "]"))
  }
  vals
}

write_fixture <- function(x, path) {
  writeLines(to_json(x), path)
  cat("wrote", path, "\n")
}

r_version <- function() R.version.string

# Path helpers: scripts are run from the repository root.
ref_dir <- function(...) file.path("tests", "reference", ...)

# Shared data: the differenced BJsales pair.
load_bjsales <- function() {
  d <- read.csv(ref_dir("data", "bjsales.csv"))
  d$sales <- as.numeric(d$sales)
  d$lead <- as.numeric(d$lead)
  d
}
load_airpassengers <- function() {
  d <- read.csv(ref_dir("data", "airpassengers.csv"))
  d$passengers <- as.numeric(d$passengers)
  d
}
