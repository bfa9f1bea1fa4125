# The whole job in R for `npm run bench` (issue: speed of the whole job as the user feels it), timed from outside
# as one fresh process: read the CSV, glm(), profile-likelihood intervals (confint on a glm: MASS's profile in
# R 4.2) and a likelihood-ratio test of each term (drop1). Usage: Rscript glm_whole.R FILE.csv
args <- commandArgs(trailingOnly = TRUE)
d <- read.csv(args[1])
f <- glm(y ~ ., family = binomial, data = d, control = glm.control(epsilon = 1e-10, maxit = 50))
ci <- suppressMessages(confint(f))
lr <- drop1(f, test = "LRT")
cat(sprintf("{\"coefficients\": %d, \"intervals\": %d, \"termTests\": %d, \"R\": \"%s\"}\n",
            length(coef(f)), sum(is.finite(ci[, 1]) & is.finite(ci[, 2])), nrow(lr) - 1,
            paste(R.version$major, R.version$minor, sep = ".")))
