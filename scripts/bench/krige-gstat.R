#!/usr/bin/env Rscript
# gstat side of `npm run bench:krige`: ordinary kriging of the same job with gstat::krige.
#   Rscript scripts/bench/krige-gstat.R DIR
# DIR holds stations.csv (lon,lat,value), targets.bin (lon,lat pairs as little-endian doubles)
# and params.csv (nugget,psill,range,nmax; nmax = 0 for the global neighbourhood).
# Writes pred.bin and var.bin (doubles) to DIR and prints the krige() time in seconds
# (elapsed, then CPU).
suppressPackageStartupMessages({
  library(sp)
  library(gstat)
})
dir <- commandArgs(trailingOnly = TRUE)[1]
st <- read.csv(file.path(dir, "stations.csv"))
par <- read.csv(file.path(dir, "params.csv"))
xy <- readBin(file.path(dir, "targets.bin"), "double", n = 2 * par$targets, endian = "little")
tg <- data.frame(lon = xy[c(TRUE, FALSE)], lat = xy[c(FALSE, TRUE)])
ll <- CRS("+proj=longlat +datum=WGS84")
coordinates(st) <- ~lon + lat
proj4string(st) <- ll
coordinates(tg) <- ~lon + lat
proj4string(tg) <- ll
model <- vgm(par$psill, "Exp", par$range, par$nugget)
nmax <- if (par$nmax > 0) par$nmax else Inf
st_time <- system.time(k <- krige(value ~ 1, st, tg, model, nmax = nmax, debug.level = 0))
writeBin(as.double(k$var1.pred), file.path(dir, "pred.bin"), endian = "little")
writeBin(as.double(k$var1.var), file.path(dir, "var.bin"), endian = "little")
# elapsed and CPU (user + system) seconds of the krige() call
cat(sprintf("%.3f %.3f\n", st_time[["elapsed"]], st_time[["user.self"]] + st_time[["sys.self"]]))
