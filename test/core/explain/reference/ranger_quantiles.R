# Holdout coverage of quantile regression forest intervals (Meinshausen 2006, JMLR 7) from R's ranger, on the
# open regression datasets, as an outside figure for test/core/explain/quantiles.test.ts.
#
#   Rscript test/core/explain/reference/ranger_quantiles.R   (from the repository root; about a minute)
#
# Folds are fixed by row position (data row i, counted from 0, is in fold i mod 4), so the Copse test holds
# out exactly the same rows without sharing a random number generator. Settings follow Copse's defaults:
# bootstrap of n rows with replacement, floor(p/3) features per split, nodes split down to one row.
suppressPackageStartupMessages({ library(ranger); library(jsonlite) })

datasets <- list(
  friedman1 = list(file = "test/fixtures/open/friedman1.csv", target = "y"),
  diabetes = list(file = "test/fixtures/open/diabetes.csv", target = "progression")
)
levels <- c(0.8, 0.9)
seeds <- 1:5
folds <- 4
out <- list(rangerVersion = as.character(packageVersion("ranger")), rVersion = paste(R.version$major, R.version$minor, sep = "."),
            folds = folds, trees = 500, seeds = seeds, levels = levels, datasets = list())
for (name in names(datasets)) {
  d <- datasets[[name]]
  data <- read.csv(d$file)
  n <- nrow(data)
  p <- ncol(data) - 1
  fold <- (seq_len(n) - 1) %% folds
  y <- data[[d$target]]
  per <- list()
  for (level in levels) per[[as.character(level)]] <- list(coverage = numeric(0), width = numeric(0))
  for (seed in seeds) {
    lower <- matrix(NA, n, length(levels)); upper <- matrix(NA, n, length(levels))
    for (k in 0:(folds - 1)) {
      train <- data[fold != k, ]
      test <- data[fold == k, ]
      fit <- ranger(as.formula(paste(d$target, "~ .")), data = train, num.trees = 500, mtry = max(1, floor(p / 3)),
                    min.node.size = 1, replace = TRUE, sample.fraction = 1, quantreg = TRUE, seed = seed, num.threads = 2)
      probs <- c((1 - levels) / 2, (1 + levels) / 2)
      q <- predict(fit, test, type = "quantiles", quantiles = probs)$predictions
      lower[fold == k, ] <- q[, seq_along(levels)]
      upper[fold == k, ] <- q[, length(levels) + seq_along(levels)]
    }
    for (j in seq_along(levels)) {
      key <- as.character(levels[j])
      per[[key]]$coverage <- c(per[[key]]$coverage, mean(y >= lower[, j] & y <= upper[, j]))
      per[[key]]$width <- c(per[[key]]$width, mean(upper[, j] - lower[, j]))
    }
  }
  entry <- list(file = d$file, target = d$target, rows = n)
  for (key in names(per)) {
    entry[[key]] <- list(coverageMean = round(mean(per[[key]]$coverage), 4), coveragePerSeed = round(per[[key]]$coverage, 4),
                         widthMean = round(mean(per[[key]]$width), 4))
  }
  out$datasets[[name]] <- entry
}
writeLines(toJSON(out, auto_unbox = TRUE, pretty = TRUE, digits = NA), "test/core/explain/reference/ranger-quantiles.json")
