#!/usr/bin/Rscript
# Records R ranger's random forest figures on the open datasets: a second, independent
# implementation beside scikit-learn (scripts/sklearn_reference.py), whose permutation importance is
# natively out-of-bag (Breiman 2001, per tree), the same form Copse reports.
#
# Run: Rscript scripts/ranger_reference.R   (Debian r-cran-ranger)
# Writes test/fixtures/reference/ranger.json with the same layout and our own key names as
# sklearn.json. Settings match Copse's defaults: floor(sqrt(p)) or floor(p/3) features per split,
# bootstrap of n rows with replacement, leaves down to one row (ranger's regression default is 5),
# no depth limit.

suppressPackageStartupMessages({
  library(ranger)
  library(jsonlite)
})

args <- commandArgs(trailingOnly = FALSE)
script <- sub("^--file=", "", args[grep("^--file=", args)])
root <- normalizePath(file.path(dirname(script), ".."))
open_dir <- file.path(root, "test", "fixtures", "open")
out_file <- file.path(root, "test", "fixtures", "reference", "ranger.json")

TREES <- 500
SEEDS <- 1:10
WORKERS <- 2
TOP_K <- 3

datasets <- list(
  list(key = "iris", file = "iris.csv", target = "species", task = "classification"),
  list(key = "wine", file = "wine.csv", target = "cultivar", task = "classification"),
  list(key = "pima", file = "pima.csv", target = "type", task = "classification"),
  list(key = "diabetes", file = "diabetes.csv", target = "progression", task = "regression"),
  list(key = "friedman1", file = "friedman1.csv", target = "y", task = "regression")
)

r6 <- function(x) round(x, 6)

summarise <- function(v) {
  list(mean = r6(mean(v)), sd = r6(sd(v)), min = r6(min(v)), max = r6(max(v)), perSeed = r6(v))
}

per_feature <- function(names, m) {
  mean_v <- colMeans(m)
  sd_v <- apply(m, 2, sd)
  ord <- order(-mean_v)
  tops <- lapply(seq_len(nrow(m)), function(i) order(-m[i, ])[1:TOP_K])
  stable <- names[ord][sapply(ord, function(j) all(sapply(tops, function(t) j %in% t)))]
  list(
    mean = as.list(setNames(r6(mean_v), names)),
    sd = as.list(setNames(r6(sd_v), names)),
    ranking = names[ord],
    stableTop = list(k = TOP_K, features = I(stable))
  )
}

run_dataset <- function(d) {
  frame <- read.csv(file.path(open_dir, d$file), check.names = FALSE, stringsAsFactors = FALSE)
  names <- setdiff(colnames(frame), d$target)
  p <- length(names)
  n <- nrow(frame)
  y <- frame[[d$target]]
  if (d$task == "classification") {
    frame[[d$target]] <- factor(y)
    k <- floor(sqrt(p))
    spec <- "sqrt"
  } else {
    k <- max(1, floor(p / 3))
    spec <- "third"
  }
  scores <- numeric(0)
  impurity <- matrix(0, length(SEEDS), p)
  permutation <- matrix(0, length(SEEDS), p)
  for (i in seq_along(SEEDS)) {
    fit <- function(kind) {
      ranger(dependent.variable.name = d$target, data = frame, num.trees = TREES, mtry = k,
             min.node.size = 1, replace = TRUE, sample.fraction = 1, importance = kind,
             classification = d$task == "classification", seed = SEEDS[i], num.threads = WORKERS)
    }
    f <- fit("permutation")
    if (d$task == "classification") {
      score <- mean(as.character(f$predictions) == as.character(frame[[d$target]]))
    } else {
      # R^2 with the n denominator, as sklearn computes it (ranger's own r.squared uses var(), n - 1).
      score <- 1 - sum((y - f$predictions)^2) / sum((y - mean(y))^2)
    }
    scores <- c(scores, score)
    permutation[i, ] <- f$variable.importance[names]
    g <- fit("impurity")
    # Normalised to sum 1 so it compares with sklearn's and ours; ranger reports raw impurity sums.
    impurity[i, ] <- g$variable.importance[names] / sum(g$variable.importance)
    message(sprintf("  %s seed %d: oob %.4f", d$file, SEEDS[i], score))
  }
  metric <- if (d$task == "classification") "oobAccuracy" else "oobR2"
  entry <- list(
    file = paste0("test/fixtures/open/", d$file),
    target = d$target,
    task = d$task,
    rows = n,
    features = p,
    featureNames = names,
    settings = list(trees = TREES, featuresPerSplit = spec, featuresPerSplitResolved = k,
                    bootstrap = TRUE, sampleFraction = 1, minLeaf = 1, maxDepth = NULL,
                    criterion = if (d$task == "classification") "gini" else "squared-error",
                    seeds = SEEDS, workers = WORKERS)
  )
  entry[[metric]] <- summarise(scores)
  entry$impurityImportance <- per_feature(names, impurity)
  entry$permutationImportance <- per_feature(names, permutation)
  entry$permutationImportanceForm <- if (d$task == "classification") {
    "per-tree out-of-bag, averaged over trees: accuracy drop (ranger, unscaled)"
  } else {
    "per-tree out-of-bag, averaged over trees: rise in mean squared error (ranger, unscaled)"
  }
  entry
}

result <- list(
  generatedBy = "scripts/ranger_reference.R",
  source = "R ranger (Debian r-cran-ranger)",
  rangerVersion = as.character(packageVersion("ranger")),
  rVersion = paste(R.version$major, R.version$minor, sep = "."),
  datasets = list()
)
for (d in datasets) {
  message(d$file, " ...")
  result$datasets[[d$key]] <- run_dataset(d)
}
dir.create(dirname(out_file), showWarnings = FALSE, recursive = TRUE)
writeLines(toJSON(result, auto_unbox = TRUE, pretty = TRUE, digits = NA, null = "null"), out_file)
message("wrote ", out_file)
