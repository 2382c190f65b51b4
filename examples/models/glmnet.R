#!/usr/bin/env Rscript
# A command model for foldseal (docs/command-models.md): an elastic-net logistic regression with
# R's glmnet (Debian's r-cran-glmnet). Base R reads and writes the tables; jsonlite is not needed:
# the few request fields used are read with a regular expression.
#
#   Rscript glmnet.R fit FOLDER       FOLDER/request.json + FOLDER/train.csv -> FOLDER/model/fit.rds
#   Rscript glmnet.R predict FOLDER   FOLDER/model/fit.rds + FOLDER/rows.csv -> FOLDER/proba.csv
#
# Options (protocol model.options): alpha (default 0.5, the elastic-net mix), lambda (default 0.01).
suppressPackageStartupMessages(library(glmnet))

args <- commandArgs(trailingOnly = TRUE)
mode <- args[1]
folder <- args[2]
request <- paste(readLines(file.path(folder, "request.json"), warn = FALSE), collapse = "\n")
field <- function(name, default) {
  m <- regmatches(request, regexec(sprintf('"%s"\\s*:\\s*([-0-9.eE]+)', name), request))[[1]]
  if (length(m) == 2) as.numeric(m[2]) else default
}
classes <- {
  inside <- regmatches(request, regexec('"classes"\\s*:\\s*\\[([^]]*)\\]', request))[[1]][2]
  gsub('^\\s*"|"\\s*$', "", strsplit(inside, ",")[[1]])
}
read_table <- function(name) read.csv(file.path(folder, name), colClasses = "character", check.names = FALSE)

if (mode == "fit") {
  train <- read_table("train.csv")
  x <- as.matrix(data.frame(lapply(train[, -(1:2), drop = FALSE], as.numeric)))
  y <- factor(train$label, levels = classes)
  set.seed(field("seed", 1))
  family <- if (length(classes) == 2) "binomial" else "multinomial"
  fit <- glmnet(x, y, family = family, alpha = field("alpha", 0.5), lambda = field("lambda", 0.01))
  saveRDS(list(fit = fit, family = family), file.path(folder, "model", "fit.rds"))
  writeLines(sprintf('{"R": "%s", "glmnet": "%s"}', paste(R.version$major, R.version$minor, sep = "."),
                     as.character(packageVersion("glmnet"))), file.path(folder, "model", "versions.json"))
} else if (mode == "predict") {
  saved <- readRDS(file.path(folder, "model", "fit.rds"))
  rows <- read_table("rows.csv")
  x <- as.matrix(data.frame(lapply(rows[, -1, drop = FALSE], as.numeric)))
  p <- predict(saved$fit, newx = x, type = "response")
  p <- if (saved$family == "binomial") cbind(1 - p[, 1], p[, 1]) else p[, , 1]
  out <- data.frame(id = rows$id, p, check.names = FALSE)
  names(out) <- c("id", paste0("p_", classes))
  write.csv(format(out, digits = 17), file.path(folder, "proba.csv"), row.names = FALSE)
} else {
  stop(sprintf("unknown mode %s: expected fit or predict", mode))
}
