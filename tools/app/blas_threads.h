// Reproducible linear algebra: the supernodal Cholesky factorization (CHOLMOD) does its dense work in
// the BLAS, and a multi-threaded OpenBLAS splits that work differently for each thread count, which
// changes the round-off of the solution in its last digits. One BLAS thread makes every result
// bit-identical whatever OMP_NUM_THREADS / OPENBLAS_NUM_THREADS say (and, measured on the bundled
// demo case of ~31 000 unknowns on two cores, the factorization was no slower: 0.05 s against 0.07-0.09 s).
#pragma once

namespace hv {

// Sets the BLAS to one thread when it is OpenBLAS (found at run time, so another BLAS, which needs
// nothing, links as well). Call at the start of main(), before any factorization.
void use_one_blas_thread();

}  // namespace hv
