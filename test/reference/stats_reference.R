# DeLong's interval and paired test from pROC (Debian's r-cran-proc) on scikit-learn's bundled
# breast-cancer table (data/breast-cancer.csv): writes fixtures/stats-proc.json.
# Usage: Rscript stats_reference.R   (from test/reference/)
suppressMessages(library(pROC))
d <- read.csv("data/breast-cancer.csv")
y <- factor(d$diagnosis, levels = c("benign", "malignant"))
one <- function(col, sub) {
  idx <- if (is.null(sub)) seq_len(nrow(d)) else sub
  r <- roc(y[idx], d[[col]][idx], levels = c("benign", "malignant"), direction = "<", quiet = TRUE)
  ci <- ci.auc(r, conf.level = 0.95, method = "delong")
  list(column = col, rows = length(idx), auc = as.numeric(auc(r)), lower = ci[1], upper = ci[3], var = var(r, method = "delong"))
}
sub <- seq(1, nrow(d), by = 7)  # a smaller sample with a wider interval
out <- list(
  single = list(one("mean_radius", NULL), one("worst_concave_points", NULL), one("mean_texture", sub), one("smoothness_error", sub)),
  paired = lapply(list(c("mean_radius", "mean_texture"), c("worst_concave_points", "worst_perimeter")), function(pair) {
    r1 <- roc(y, d[[pair[1]]], levels = c("benign", "malignant"), direction = "<", quiet = TRUE)
    r2 <- roc(y, d[[pair[2]]], levels = c("benign", "malignant"), direction = "<", quiet = TRUE)
    t <- roc.test(r1, r2, method = "delong", paired = TRUE)
    list(a = pair[1], b = pair[2], z = unname(t$statistic), p = t$p.value)
  })
)
writeLines(jsonlite::toJSON(out, auto_unbox = TRUE, digits = NA), "fixtures/stats-proc.json")
