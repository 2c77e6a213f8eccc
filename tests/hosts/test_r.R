# test_r.R: the R host (bandmass_r.so through bandmass.R): answers equal the
# command line's, values convert with the documented shapes, every refusal
# names the path of the value, errors are conditions carrying the code.
source(Sys.getenv("BANDMASS_R"))
test_dir <- Sys.getenv("BANDMASS_TEST_DIR")
cli_path <- Sys.getenv("BANDMASS_CLI")

check <- function(cond, what) {
  if (!isTRUE(cond)) stop("check failed: ", what, call. = FALSE)
}

# The command line's answer to `bandmass ARGS --input FILE`, decoded.
cli_text <- function(args, request = NULL) {
  if (!is.null(request)) {
    f <- tempfile(fileext = ".json")
    writeLines(request, f)
    on.exit(unlink(f))
    args <- c(args, "--input", shQuote(f))
  }
  out <- suppressWarnings(system2(cli_path, args, stdout = TRUE, stderr = TRUE))
  status <- attr(out, "status")
  if (!is.null(status) && status != 0)
    stop("bandmass ", paste(args, collapse = " "), " failed: ", paste(out, collapse = "\n"))
  paste(out, collapse = "\n")
}
cli <- function(args, request = NULL) bandmass_decode(cli_text(args, request))

# Equal values: same names, types and shapes; numbers within 1e-12 relative
# (or 1e-14 absolute). Inside R, GSL's BLAS calls bind to R's BLAS, so fits
# may differ from the command line's in the last few ulp.
same <- function(a, b, where) {
  if (is.list(a)) {
    check(is.list(b) && length(a) == length(b), paste0(where, ": list length"))
    check(identical(names(a), names(b)), paste0(where, ": names"))
    check(identical(class(a), class(b)), paste0(where, ": class"))
    for (i in seq_along(a)) {
      key <- if (is.null(names(a))) paste0("[[", i, "]]") else paste0("$", names(a)[i])
      same(a[[i]], b[[i]], paste0(where, key))
    }
  } else if (is.character(a) || is.logical(a) || is.null(a)) {
    check(identical(a, b), paste0(where, ": values"))
  } else {
    check(is.double(a) && is.double(b), paste0(where, ": numeric"))
    check(identical(dim(a), dim(b)) && length(a) == length(b), paste0(where, ": shape"))
    check(identical(is.na(a), is.na(b)), paste0(where, ": NA"))
    ok <- !is.na(a)
    d <- abs(a[ok] - b[ok])
    check(all(d <= 1e-12 * pmax(abs(a[ok]), abs(b[ok])) | d <= 1e-14), paste0(where, ": numbers"))
  }
}

# A failure of the expected class whose message holds fragment (fixed text).
expect_error <- function(class, fragment, expr) {
  e <- tryCatch({ expr; NULL }, error = function(e) e)
  check(!is.null(e), paste("no error raised, wanted", class))
  check(inherits(e, class) && inherits(e, "bandmass_error"),
        paste0("class ", paste(class(e), collapse = "/"), ", wanted ", class))
  check(grepl(fragment, conditionMessage(e), fixed = TRUE),
        paste0("message: ", conditionMessage(e), " (wanted: ", fragment, ")"))
  invisible(e)
}
refused <- function(fragment, expr) expect_error("bandmass_invalid_input", fragment, expr)

# An integer64 of bit64 from its two 32-bit halves (the int64 bits in a
# double, as bit64 keeps them; the package itself is not needed).
int64 <- function(low, high) {
  halves <- vapply(c(low, high), function(h) if (h == -2^31) NA_integer_ else as.integer(h), 0L)
  structure(readBin(writeBin(halves, raw(), endian = "little"),
                    "double", endian = "little"), class = "integer64")
}

# --- constants: the same numbers as the CLI, whichever way the request goes
ref <- cli(c("call", "constants"), "{}")
r <- bandmass_call("constants", list())
same(r, ref, "constants")
check(identical(bandmass_call("constants"), r), "no request means {}")
check(identical(bandmass_call("constants", NULL), r), "NULL means {}")
check(identical(bandmass_call("constants", "{}"), r), "JSON text request")
# exactly the CLI's digits: compare with the number text it prints
text <- cli_text(c("call", "constants"), "{}")
for (name in names(ref$constants)) {
  m <- regmatches(text, regexec(paste0('"', name, '" : \\{\\s*"value" : ([-+0-9.eE]+)'), text))[[1]]
  check(length(m) == 2 && r$constants[[name]]$value == as.numeric(m[2]), name)
}
check(is.character(r$warnings) && length(r$warnings) == 0, "warnings: an empty character vector")
check(is.character(r$warning_codes) && length(r$warning_codes) == 0, "warning codes likewise")

# --- the operation list, as `bandmass ops --json`
ops <- bandmass_operations()
ref_ops <- cli(c("ops", "--json"))
check(is.data.frame(ops) && nrow(ops) == length(ref_ops), "operations: a data frame")
check(identical(ops$name, vapply(ref_ops, function(o) o$name, "")), "operation names")
check(identical(ops$summary, vapply(ref_ops, function(o) o$summary, "")), "operation summaries")
for (i in seq_along(ref_ops)) {
  same(ops$params[[i]], ref_ops[[i]]$params, paste0("params of ", ops$name[i]))
  same(ops$response[[i]], ref_ops[[i]]$response, paste0("response of ", ops$name[i]))
}
check(is.data.frame(ops$response[[1]]) && "meaning" %in% names(ops$response[[1]]),
      "response keys: a data frame")

# --- shapes of the conversion (JSON -> R), each spelled out
x <- bandmass_decode(paste0('{"m": [[1,2,3],[4,5,6]], "v": [1, null, 3], "s": [{"a":1},{"a":2}], ',
                            '"w": ["x","y"], "t": true, "n": null, "e": [], "warnings": [], ',
                            '"l": [true, null], "ws": ["a", null], "mix": [1, "x"], ',
                            '"d": [{"a": 1, "b": [1, 2], "c": "p", "z": null}, ',
                            '{"a": null, "b": [3], "c": null, "z": null}], ',
                            '"o": [{"a": 1}, {"b": 2}], "deep": [{"a": {"b": 1}}], "i": 9007199254740993}'))
check(identical(x$m, rbind(c(1, 2, 3), c(4, 5, 6))), "matrix: rows are the outer index")
check(identical(x$v, c(1, NA, 3)), "numeric vector, null as NA")
check(identical(x$s, data.frame(a = c(1, 2))), "objects with the same keys: a data frame")
check(identical(x$w, c("x", "y")), "strings: a character vector")
check(identical(x$t, TRUE), "logical")
check("n" %in% names(x) && is.null(x$n), "null as NULL, the key kept")
check(identical(x$e, list()), "[] as list()")
check(identical(x$warnings, character(0)), "warnings [] as character(0)")
check(identical(x$l, c(TRUE, NA)) && identical(x$ws, c("a", NA)), "logical and character NA")
check(identical(x$mix, list(1, "x")), "mixed array: a list")
check(is.data.frame(x$d) && identical(x$d$a, c(1, NA)) && identical(x$d$c, c("p", NA)) &&
      identical(x$d$b, list(c(1, 2), 3)) && identical(x$d$z, c(NA, NA)),
      "data frame: plain columns with NA, a list column for arrays")
check(identical(x$o, list(list(a = 1), list(b = 2))), "objects with other keys: a list")
check(identical(x$deep, list(list(a = list(b = 1)))), "objects holding objects: a list")
check(x$i == 9007199254740992, "a JSON integer as a double")

# --- R -> JSON, each spelled out
sent <- bandmass_encode(list(mesh = c(4, 4, 2), axes = rbind(c(1, 0, 0), c(0, 1, 0)), name = "cb",
                             on = TRUE, parts = list(1, "two"), n = 7L, one = I(300),
                             flags = c(TRUE, FALSE), tags = c("a", "b"), none = NULL, e = list(),
                             obj = setNames(list(), character(0)), ints = 1:3,
                             m1 = matrix(5, 1, 1), im = matrix(1:4, 2),
                             rows = data.frame(species = c("P", "As"), density_cm3 = c(1e16, 2e17))))
check(identical(sent, paste0('{"mesh":[4,4,2],"axes":[[1,0,0],[0,1,0]],"name":"cb","on":true,',
                             '"parts":[1,"two"],"n":7,"one":[300],"flags":[true,false],',
                             '"tags":["a","b"],"none":null,"e":[],"obj":{},"ints":[1,2,3],',
                             '"m1":[[5]],"im":[[1,3],[2,4]],',
                             '"rows":[{"species":"P","density_cm3":1e16},',
                             '{"species":"As","density_cm3":2e17}]}')), paste("encode:", sent))
# a 3x3 matrix goes row by row, as the JSON reads (m[1, ] first)
check(identical(bandmass_encode(matrix(1:9, 3, byrow = TRUE)), "[[1,2,3],[4,5,6],[7,8,9]]"),
      "3x3 matrix row-major")
check(identical(bandmass_encode("caf\u00e9"), "\"caf\u00e9\""), "UTF-8 text")
latin <- iconv("caf\u00e9", "UTF-8", "latin1")
check(Encoding(latin) == "latin1" && identical(bandmass_encode(latin), "\"caf\u00e9\""),
      "latin1 text re-encoded")

# --- numbers are sent exactly: the request object is built from the R
# value (no JSON text in between) and the one writer spells what was sent
sent <- bandmass_encode(list(a = 1e17, b = 2e17, c = 1e20, d = 1e300, e = -0, i = 0.1,
                             j = 5e-324, m = 300, big = int64(1, 2^21),
                             max = int64(-1, 2147483647), min = int64(1, -2^31),
                             imax = .Machine$integer.max, imin = -.Machine$integer.max,
                             w = 2^53, w1 = 2^53 - 1))
check(identical(sent, paste0('{"a":1e17,"b":2e17,"c":1e20,"d":1e300,"e":-0.0,"i":0.1,',
                             '"j":5e-324,"m":300,"big":9007199254740993,',
                             '"max":9223372036854775807,"min":-9223372036854775807,',
                             '"imax":2147483647,"imin":-2147483647,',
                             '"w":9007199254740992.0,"w1":9007199254740991}')), paste("exact encode:", sent))
# what the operation received: fermi-integral repeats eta, and for order 0
# F_0(eta) = ln(1 + e^eta) = eta + ln(1 + e^-eta), which is eta itself in
# doubles once e^-eta underflows (mathematical identity)
eta <- c(1e17, 2e17, 1e20, 1e300, -0)
fi <- bandmass_call("fermi-integral", list(order = 0, eta = eta))
check(identical(fi$eta, eta), "fermi-integral received the doubles exactly")
check(1 / fi$eta[5] == -Inf, "fermi-integral received -0 as -0")
check(identical(fi$values[1:4], eta[1:4]), "F_0(eta) = eta for eta >= 1e17 (identity)")
same(fi, cli(c("call", "fermi-integral"), '{"order": 0, "eta": [1e17, 2e17, 1e20, 1e300, -0.0]}'),
     "fermi-integral")
# integer64 above 2^53 arrives exact: the band index is repeated in the
# registry's message
grid <- file.path(test_dir, "..", "data", "grid-small.json")
refused("band index 9007199254740993 is out of range",
        bandmass_call("mass-tensor", list(grid = grid, band = int64(1, 2^21))))
refused("band index 9223372036854775807 is out of range",
        bandmass_call("mass-tensor", list(grid = grid, band = int64(-1, 2147483647))))
# a double from 2^53 up may not be the integer meant (2^53 + 1 reads as
# 2^53): it goes as a double, which a key taking an integer refuses
refused('request key "band" of mass-tensor must be string or integer',
        bandmass_call("mass-tensor", list(grid = grid, band = 2^53)))
refused("band index 9007199254740991 is out of range",
        bandmass_call("mass-tensor", list(grid = grid, band = 2^53 - 1)))

# --- every refusal names the path of the value
refused("request$f: a value of type closure: a function cannot be sent",
        bandmass_call("constants", list(f = function(x) x)))
refused("request$f: a value of type builtin: a function cannot be sent",
        bandmass_call("constants", list(f = sin)))
refused("request$z[[2]]: a value of type complex: complex numbers cannot be sent",
        bandmass_call("constants", list(z = list(1, 1 + 2i))))
refused("request$species: a value of type integer and class factor: a factor cannot be sent",
        bandmass_call("constants", list(species = factor("P"))))
refused("request$donors$species: a value of type integer and class factor",
        bandmass_call("carrier-statistics",
                      list(material = "Si", donors = data.frame(species = factor("P"),
                                                                density_cm3 = 1e16))))
refused("request$t: NA (a missing value) cannot be sent",
        bandmass_call("constants", list(t = NA_real_)))
refused("request$donors$density_cm3[2]: NA (a missing value) cannot be sent",
        bandmass_call("carrier-statistics",
                      list(material = "Si", donors = data.frame(species = c("P", "As"),
                                                                density_cm3 = c(1e16, NA)))))
refused("request$t[2]: NaN and Inf cannot be sent",
        bandmass_call("constants", list(t = c(1, NaN))))
refused("request$t[[1]]$x: NaN and Inf cannot be sent",
        bandmass_call("constants", list(t = list(list(x = Inf)))))
refused("request$t: NaN and Inf cannot be sent", bandmass_call("constants", list(t = -Inf)))
refused("request$n: NA (a missing value) cannot be sent",
        bandmass_call("constants", list(n = NA_integer_)))
refused("request$b[2]: NA (a missing value) cannot be sent",
        bandmass_call("constants", list(b = c(TRUE, NA))))
refused("request$s: NA (a missing value) cannot be sent",
        bandmass_call("constants", list(s = NA_character_)))
refused("request$m[2, 1]: NA (a missing value) cannot be sent",
        bandmass_call("constants", list(m = rbind(c(1, 2), c(NA, 4)))))
refused("request$band: NA (a missing value) cannot be sent",
        bandmass_call("mass-tensor", list(grid = grid, band = int64(0, -2^31))))
refused("request$r: a value of type raw: raw bytes cannot be sent",
        bandmass_call("constants", list(r = as.raw(1:3))))
refused("request$env: a value of type environment: an environment cannot be sent",
        bandmass_call("constants", list(env = new.env())))
refused("request$q: a value of type symbol: this type cannot be sent",
        bandmass_call("constants", list(q = quote(x))))
refused("request$when: a value of type double and class Date: a vector with a class cannot be sent",
        bandmass_call("constants", list(when = as.Date("2020-01-01"))))
refused("request$a: a value of type integer: arrays of more than 2 dimensions cannot be sent",
        bandmass_call("constants", list(a = array(1:8, c(2, 2, 2)))))
refused("request$v: a value of type double: a vector with names cannot be sent",
        bandmass_call("constants", list(v = c(a = 1, b = 2))))
refused("request$x: a value of type list: a list must have a name for every element",
        bandmass_call("constants", list(x = list(a = 1, 2))))
refused("request: a value of type list: a list with a repeated name cannot be sent",
        bandmass_call("constants", list(a = 1, a = 2)))
refused("request$fit: a value of type list and class lm: a list with a class cannot be sent",
        bandmass_call("constants", list(fit = structure(list(a = 1), class = "lm"))))
bytes <- "ab\xff"
Encoding(bytes) <- "bytes"
refused("request$t: a string marked as bytes cannot be sent",
        bandmass_call("constants", list(t = bytes)))
bad <- "\xc8\xc9"
Encoding(bad) <- "UTF-8"
refused("request$t: byte 1 (\\xC8) is not UTF-8 text", bandmass_call("constants", list(t = bad)))
deep <- 1
for (i in 1:70) deep <- list(deep)
refused("nested deeper than 64 levels", bandmass_call("constants", list(d = deep)))
# S4 objects: any of them, and so the Matrix package's sparse matrices
setClass("bandmass_test_s4", representation(x = "numeric"))
refused("request$s: a value of type S4 and class bandmass_test_s4: an S4 object cannot be sent",
        bandmass_call("constants", list(s = new("bandmass_test_s4", x = 1))))
if (requireNamespace("Matrix", quietly = TRUE)) {
  refused("request$eta: a value of type S4 and class dgCMatrix: an S4 object cannot be sent",
          bandmass_call("fermi-integral",
                        list(order = 0.5, eta = Matrix::sparseMatrix(i = 1, j = 3, x = 2))))
  refused("request$eta: a value of type S4 and class ddiMatrix: an S4 object cannot be sent",
          bandmass_call("fermi-integral", list(order = 0.5, eta = Matrix::Diagonal(3))))
  cat("Matrix objects: refused\n")
} else {
  cat("Matrix package not installed: its objects not tried (S4 refusal checked)\n")
}
# an unnamed list where an object is needed: the request itself, and a
# list element the operation reads as an object (the registry names it)
expect_error("bandmass_usage", "the request must be a named list",
             bandmass_call("constants", list(1, 2)))
expect_error("bandmass_usage", "this is a data frame",
             bandmass_call("constants", data.frame(a = 1)))
expect_error("bandmass_usage", "this is a value of type double",
             bandmass_call("constants", 42))
refused("donors[0]: must be an object",
        bandmass_call("carrier-statistics",
                      list(material = "Si", temperature_k = 300, donors = list(list("P", 1e16)))))
refused("value$z: a value of type complex", bandmass_encode(list(z = 1i)))

# --- errors are conditions of their own class, carrying the code and the call
e <- refused('request key "colour" is not a parameter of constants',
             bandmass_call("constants", list(colour = 1)))
check(identical(e$code, "invalid-input"), "code of invalid input")
check(identical(conditionCall(e)[[1]], as.name("bandmass_call")), "the call of the condition")
e <- expect_error("bandmass_unknown_operation", 'no operation named "nonesuch"',
                  bandmass_call("nonesuch"))
check(identical(e$code, "unknown-operation"), "code of an unknown operation")
refused("request: line 1, column 7 (byte 6), at \"a\": not valid JSON", bandmass_call("constants", "{\"a\": "))
refused("request for constants is not a JSON object", bandmass_call("constants", "[1]"))
e <- expect_error("bandmass_usage", "the operation name must be one string", bandmass_call(42))
check(identical(e$code, "usage"), "code of a usage error")
expect_error("bandmass_usage", "the operation name must be one string",
             bandmass_call(c("constants", "drude")))
e <- expect_error("bandmass_io", "", bandmass_call("mass-tensor", list(grid = "/nonexistent.json")))
check(identical(e$code, "io"), paste("code of a file that cannot be read:", conditionMessage(e)))
refused("JSON text: line 1, column 2 (byte 1): not valid JSON", bandmass_decode("{"))

# --- warnings: kept in the response and signalled as conditions with codes
seen <- list()
r <- withCallingHandlers(
  bandmass_call("hole-mass", list(heavy_hole_mass_me = 0.2, light_hole_mass_me = 0.5)),
  bandmass_warning = function(w) {
    seen[[length(seen) + 1]] <<- w
    invokeRestart("muffleWarning")
  })
check("mass-order" %in% r$warning_codes, "light above heavy: mass-order (README warning table)")
check(length(seen) == length(r$warnings) && length(seen) > 0, "one R warning per response warning")
check(identical(vapply(seen, function(w) w$code, ""), r$warning_codes), "warning codes carried")
check(identical(vapply(seen, conditionMessage, ""), r$warnings), "warning messages carried")
check(identical(seen[[1]]$operation, "hole-mass"), "warning names its operation")
quiet <- withCallingHandlers(
  bandmass_call("hole-mass", list(heavy_hole_mass_me = 0.2, light_hole_mass_me = 0.5), warn = FALSE),
  warning = function(w) stop("signalled with warn = FALSE"))
check(identical(quiet, r), "warn = FALSE: the same response, nothing signalled")
same(r, cli(c("call", "hole-mass"), '{"heavy_hole_mass_me": 0.2, "light_hole_mass_me": 0.5}'),
     "hole-mass")

# --- a 3x3 matrix in and out: a valley with principal axes as rows. The
# conductivity tensor is sum_i m_i a_i a_i^T (identity of the ellipsoid), so
# axes read as columns would flip the sign of its xy element
axes <- rbind(c(1, 1, 0) / sqrt(2), c(-1, 1, 0) / sqrt(2), c(0, 0, 1))
masses <- c(0.2, 0.5, 1.0)
va <- bandmass_call("valley-average",
                    list(valleys = list(list(principal_masses_me = masses, axes = axes))))
want <- t(axes) %*% diag(masses) %*% axes
check(is.matrix(va$conductivity_mass_tensor_me) && all(dim(va$conductivity_mass_tensor_me) == 3),
      "tensor is a 3x3 matrix")
check(max(abs(va$conductivity_mass_tensor_me - want)) < 1e-12, "tensor = sum m_i a_i a_i^T")
check(va$conductivity_mass_tensor_me[1, 2] < 0, "axes went as rows")
same(va, cli(c("call", "valley-average"),
             sprintf(paste0('{"valleys": [{"principal_masses_me": [0.2, 0.5, 1.0], "axes": ',
                            '[[%.17g, %.17g, 0], [%.17g, %.17g, 0], [0, 0, 1]]}]}'),
                     axes[1, 1], axes[1, 2], axes[2, 1], axes[2, 2])), "valley-average")
# the strained-silicon request of examples/requests, as text and as a list
text <- paste(readLines(file.path(test_dir, "..", "..", "examples", "requests",
                                  "strained-si-valleys.json")), collapse = "\n")
got <- bandmass_call("valley-average", text)
same(got, cli(c("call", "valley-average"), text), "valley-average (JSON request)")
valleys <- lapply(list(c(0, 0, 1), c(0, 0, -1), c(1, 0, 0), c(-1, 0, 0), c(0, 1, 0), c(0, -1, 0)),
                  function(a) list(longitudinal_mass_me = 0.98, transverse_mass_me = 0.19, axis = a,
                                   energy_offset_ev = if (a[3] != 0) 0 else 0.12))
same(bandmass_call("valley-average", list(valleys = valleys, temperature_k = 300,
                                          statistics = "boltzmann")), got,
     "valley-average (list request)")

# --- mass-tensor on a cosine band, E = sum 2 t (1 - cos k a), simple cubic
# a = 4 A, 12^3 mesh, written as a band grid document with inline energies
n <- 12; a <- 4.0; tt <- c(0.5, 1.0, 2.0)
k <- 2 * pi / a * (0:(n - 1)) / n
planes <- character(n)
for (i in 1:n) {
  rows <- character(n)
  for (j in 1:n) {
    e <- 2 * tt[1] * (1 - cos(k[i] * a)) + 2 * tt[2] * (1 - cos(k[j] * a)) +
      2 * tt[3] * (1 - cos(k * a))
    rows[j] <- paste0("[", paste(sprintf("%.17g", e), collapse = ","), "]")
  }
  planes[i] <- paste0("[", paste(rows, collapse = ","), "]")
}
doc <- sprintf(paste0('{"format": "bandmass-grid-1", "reciprocal_vectors_inv_angstrom": ',
                      '[[%.17g,0,0],[0,%.17g,0],[0,0,%.17g]], "mesh": [%d, %d, %d], ',
                      '"band_names": ["cb"], "energies_ev": [[%s]]}'),
               2 * pi / a, 2 * pi / a, 2 * pi / a, n, n, n, paste(planes, collapse = ","))
f <- tempfile(fileext = ".json")
writeLines(doc, f)
req <- list(grid = f, band = "cb", extremum = "minimum")
got <- bandmass_call("mass-tensor", req)
want <- cli(c("call", "mass-tensor"), bandmass_encode(req))
unlink(f)
same(got, want, "mass-tensor")
x1 <- got$extrema[[1]]
check(identical(x1$kind, "minimum"), "a minimum")
check(identical(dim(x1$inverse_mass_tensor_per_me), c(3L, 3L)), "tensor is 3x3")
check(identical(dim(x1$principal_axes), c(3L, 3L)), "axes are 3x3")
check(is.null(dim(x1$principal_masses_me)) && length(x1$principal_masses_me) == 3, "masses: a vector")
# 2 t (1 - cos ka) = t a^2 k^2 + O(k^4) (Taylor), so m/m_e = (hbar^2/m_e) /
# (2 t a^2), hbar^2/m_e from the constants operation
want_m <- sort(r0 <- bandmass_call("constants")$constants$hbar2_over_me_ev_a2$value / (2 * tt * a^2))
check(all(abs(sort(x1$principal_masses_me) - want_m) <= 1e-6 * want_m), "masses of the cosine band")
cat("mass-tensor: checked against the CLI and the cosine band\n")

# --- carrier statistics: JSON text, lists and data frames give the CLI's answers
text <- paste(readLines(file.path(test_dir, "requests", "carrier-statistics.json")), collapse = "\n")
got <- bandmass_call("carrier-statistics", text)
same(got, cli(c("call", "carrier-statistics"), text), "carrier-statistics (JSON request)")
check(is.data.frame(got$points) && nrow(got$points) == 3, "points: a data frame of 3 rows")
check(is.double(got$points$ni_cm3) && is.character(got$points$regime), "plain columns")
check(is.list(got$points$ionized_donors_per_species_cm3), "an array per point: a list column")
req <- list(material = "Si", temperatures_k = c(200, 300, 400),
            donors = list(list(species = "P", density_cm3 = 1e16)))
same(bandmass_call("carrier-statistics", req), got, "carrier-statistics (list request)")
req$donors <- data.frame(species = "P", density_cm3 = 1e16)
same(bandmass_call("carrier-statistics", req), got, "carrier-statistics (data-frame donors)")
one <- bandmass_call("carrier-statistics", list(material = "Si", temperature_k = 300))
same(one, cli(c("call", "carrier-statistics"), '{"material": "Si", "temperature_k": 300}'),
     "carrier-statistics at 300 K")
check(one$ni_cm3 > 0 && one$ni_cm3 < one$nc_cm3, "ni below Nc")
# a key that takes only an array gets one from a single number
same(bandmass_call("carrier-statistics", list(material = "Si", temperatures_k = 300)),
     cli(c("call", "carrier-statistics"), '{"material": "Si", "temperatures_k": [300]}'),
     "temperatures_k = 300 sent as [300]")
# a donor density of 1e17 and above: the response repeats it exactly as sent
got <- bandmass_call("carrier-statistics",
                     list(material = "GaAs", temperature_k = 300,
                          donors = list(list(species = "Si", density_cm3 = 1e17))),
                     warn = FALSE)
check(got$donors$density_cm3[1] == 1e17, "density 1e17 received exactly")
same(got, cli(c("call", "carrier-statistics"),
              '{"material": "GaAs", "temperature_k": 300, "donors": [{"species": "Si", "density_cm3": 1e17}]}'),
     "carrier-statistics at 1e17")
# a doping sweep over 10^seq(14, 20, 0.5), each point as the CLI answers
for (d in 10^seq(14, 20, by = 0.5)) {
  got <- bandmass_call("carrier-statistics",
                       list(material = "GaAs", temperature_k = 300,
                            donors = data.frame(species = "Si", density_cm3 = d)),
                       warn = FALSE)   # degenerate doping: boltzmann-deviation, kept
  check(got$donors$density_cm3[1] == d, sprintf("density %.17g received exactly", d))
  same(got, cli(c("call", "carrier-statistics"),
                sprintf(paste0('{"material": "GaAs", "temperature_k": 300, ',
                               '"donors": [{"species": "Si", "density_cm3": %.17g}]}'), d)),
       sprintf("carrier-statistics at %g cm^-3", d))
}
cat("carrier-statistics: checked against the CLI\n")
# sourcing the loader again loads the module again (never unmapped: it is
# linked with -z nodelete, as libbandmass)
before <- bandmass_call("constants")
source(Sys.getenv("BANDMASS_R"))
check(identical(bandmass_call("constants"), before), "the loader sourced twice")
cat("r: all checks passed\n")
