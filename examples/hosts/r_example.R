# r_example.R: bandmass from R (the loader bandmass.R of a build tree, or
# the one named by BANDMASS_R).
source(Sys.getenv("BANDMASS_R", "build/plugin/r/bandmass.R"))

k <- bandmass_call("constants")$constants$boltzmann_ev_per_k   # a list: numbers stay numbers
cat(sprintf("k_B = %.6e eV/K\n", k$value))

# Silicon with 1e16 cm^-3 phosphorus: the points come back as a data frame
si <- bandmass_call("carrier-statistics",
                    list(material = "Si", temperatures_k = c(200, 300, 400),
                         donors = data.frame(species = "P", density_cm3 = 1e16)))
print(si$points[, c("temperature_k", "ni_cm3", "n_cm3", "fermi_level_ev", "regime")],
      digits = 4)

# A 3x3 matrix goes row by row: here the principal axes of one valley
axes <- rbind(c(1, 1, 0) / sqrt(2), c(-1, 1, 0) / sqrt(2), c(0, 0, 1))
va <- bandmass_call("valley-average",
                    list(valleys = list(list(principal_masses_me = c(0.2, 0.5, 1.0), axes = axes))))
print(va$conductivity_mass_tensor_me)

# Warnings stay in the response and are signalled as R warnings with a code
h <- withCallingHandlers(
  bandmass_call("hole-mass", list(heavy_hole_mass_me = 0.2, light_hole_mass_me = 0.5)),
  bandmass_warning = function(w) {
    cat("warning", w$code, "\n")
    invokeRestart("muffleWarning")
  })
cat(length(h$warnings), "warning(s) kept in the response\n")

# Errors are R errors of class bandmass_error, carrying the code
tryCatch(bandmass_call("constants", list(temperature_k = 300)),
         bandmass_error = function(e) cat(class(e)[1], e$code, conditionMessage(e), sep = "\n"))
