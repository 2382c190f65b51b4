# DeLong's paired test of two ROC AUCs from R's pROC (Debian's r-cran-proc), per repeat, on the
# out-of-fold predictions of two foldseal runs (predictions.csv: id,repeat,fold,truth,predicted,p_…).
# Usage: Rscript compare_reference.R A.csv B.csv POSITIVE OUT.json
suppressMessages(library(pROC))
args <- commandArgs(trailingOnly = TRUE)
a <- read.csv(args[1], stringsAsFactors = FALSE)
b <- read.csv(args[2], stringsAsFactors = FALSE)
positive <- args[3]
col <- paste0("p_", positive)
out <- lapply(sort(unique(a$repeat.)), function(r) {
  ra <- a[a$repeat. == r, ]
  rb <- b[b$repeat. == r, ]
  rb <- rb[match(ra$id, rb$id), ]
  lv <- c(setdiff(unique(ra$truth), positive), positive)
  r1 <- roc(factor(ra$truth, levels = lv), ra[[col]], levels = lv, direction = "<", quiet = TRUE)
  r2 <- roc(factor(rb$truth, levels = lv), rb[[col]], levels = lv, direction = "<", quiet = TRUE)
  t <- roc.test(r2, r1, method = "delong", paired = TRUE)
  list(`repeat` = r, auc_a = as.numeric(auc(r1)), auc_b = as.numeric(auc(r2)), z = unname(t$statistic), p = t$p.value)
})
writeLines(jsonlite::toJSON(out, auto_unbox = TRUE, digits = NA), args[4])
