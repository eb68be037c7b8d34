#!/usr/bin/Rscript
# ranger's side of the benchmark: one JSON object on stdout, timings in seconds (elapsed).
# Called by bench/run.ts. Times:
#   load     data.table::fread of the training file (R's fast CSV reader; read.csv would be unfair)
#   fit      ranger() with no importance (ranger computes out-of-bag predictions regardless)
#   predict  predict() on the prediction file (already loaded)
# usage: ranger_side.R --train F --target COL --trees N --features-per-split K --workers W
#                      [--seed S] [--test F] [--predict F]

suppressPackageStartupMessages({
  library(ranger)
  library(data.table)
  library(jsonlite)
})

args <- commandArgs(trailingOnly = TRUE)
opt <- list(seed = "1")
i <- 1
while (i <= length(args)) {
  key <- sub("^--", "", args[i])
  opt[[key]] <- args[i + 1]
  i <- i + 2
}
for (k in c("train", "target", "trees", "features-per-split", "workers")) {
  if (is.null(opt[[k]])) stop("missing --", k)
}
target <- opt$target
workers <- as.integer(opt$workers)
setDTthreads(workers)

elapsed <- function(expr) {
  t <- proc.time()[["elapsed"]]
  value <- force(expr)
  list(value = value, seconds = proc.time()[["elapsed"]] - t)
}

result <- list(implementation = "ranger", version = as.character(packageVersion("ranger")), seconds = list())

loaded <- elapsed(fread(opt$train, data.table = FALSE))
result$seconds$load <- loaded$seconds
train <- loaded$value
classes <- sort(unique(train[[target]]))
train[[target]] <- factor(train[[target]], levels = classes)
result$rows <- nrow(train)
result$features <- ncol(train) - 1L

fitted <- elapsed(ranger(dependent.variable.name = target, data = train,
                         num.trees = as.integer(opt$trees), mtry = as.integer(opt[["features-per-split"]]),
                         min.node.size = 1, replace = TRUE, sample.fraction = 1, importance = "none",
                         classification = TRUE, num.threads = workers, seed = as.integer(opt$seed)))
forest <- fitted$value
result$seconds$fit <- fitted$seconds
result$oob <- list(accuracy = 1 - forest$prediction.error)
result$nodes <- sum(sapply(forest$forest$split.varIDs, length))
rm(train)

if (!is.null(opt$test)) {
  test <- fread(opt$test, data.table = FALSE)
  p <- elapsed(predict(forest, data = test, num.threads = workers))
  result$seconds$testPredict <- p$seconds
  result$test <- list(accuracy = mean(as.character(p$value$predictions) == test[[target]]), rows = nrow(test))
}

if (!is.null(opt$predict)) {
  frame <- fread(opt$predict, data.table = FALSE)
  p <- elapsed(predict(forest, data = frame, num.threads = workers))
  result$seconds$predict <- p$seconds
  result$predictRows <- nrow(frame)
  if (target %in% names(frame)) {
    result$predictAccuracy <- mean(as.character(p$value$predictions) == frame[[target]])
  }
}

cat(toJSON(result, auto_unbox = TRUE, digits = NA), "\n", sep = "")
