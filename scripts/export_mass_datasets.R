#!/usr/bin/Rscript
# Writes the open datasets that come from R's MASS package under test/fixtures/open/ as plain CSV.
#
# Run: Rscript scripts/export_mass_datasets.R   (Debian r-cran-mass; no network)
# The data are the copies MASS ships inside the package; the script reads them with data(), so the
# CSV holds what the package holds, and it reads each file back to prove the text round-trips.
#
# pima.csv: MASS's Pima.tr (200 rows) followed by Pima.te (332 rows), each in the package's row
# order, columns and values unchanged. The two frames are one random split of the same 532 complete
# records (MASS's help page says so); the tests score out-of-bag, so they need the whole sample in
# one file, not the split. Column names are MASS's own, already lower case and easy to type.

suppressPackageStartupMessages(library(MASS))

args <- commandArgs(trailingOnly = FALSE)
script <- sub("^--file=", "", args[grep("^--file=", args)])
root <- normalizePath(file.path(dirname(script), ".."))
out_dir <- file.path(root, "test", "fixtures", "open")

write_checked <- function(frame, name) {
  path <- file.path(out_dir, name)
  # Factors become their level names; no quotes (no cell holds a comma) and no row names, as in the
  # other fixtures. write.csv gives numbers 15 significant digits, more than any value here carries;
  # the read-back below would catch one that did not survive.
  plain <- data.frame(lapply(frame, function(v) if (is.factor(v)) as.character(v) else v),
                      check.names = FALSE, stringsAsFactors = FALSE)
  write.csv(plain, path, row.names = FALSE, quote = FALSE, eol = "\n")
  back <- read.csv(path, check.names = FALSE, stringsAsFactors = FALSE)
  rownames(plain) <- NULL
  if (!identical(lapply(back, as.vector), lapply(plain, as.vector))) {
    stop(name, ": the CSV does not read back to the frame MASS holds")
  }
  message(sprintf("wrote %s: %d rows x %d columns", file.path("test", "fixtures", "open", name),
                  nrow(plain), ncol(plain)))
}

message(sprintf("MASS %s, R %s.%s", packageVersion("MASS"), R.version$major, R.version$minor))
dir.create(out_dir, showWarnings = FALSE, recursive = TRUE)

data(Pima.tr, Pima.te, package = "MASS")
write_checked(rbind(Pima.tr, Pima.te), "pima.csv")
