#include "tools/app/blas_threads.h"

#include <dlfcn.h>

namespace hv {

void use_one_blas_thread() {
  // OpenBLAS's own interface (openblas_set_num_threads, cblas.h of OpenBLAS); a symbol lookup instead
  // of a declaration, since the reference BLAS has no such function.
  using SetThreads = void (*)(int);
  if (void* symbol = ::dlsym(RTLD_DEFAULT, "openblas_set_num_threads"))
    reinterpret_cast<SetThreads>(symbol)(1);
}

}  // namespace hv
