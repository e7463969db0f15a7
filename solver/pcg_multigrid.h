// Conjugate gradients (Hestenes & Stiefel, J. Res. Natl. Bur. Stand. 49, 1952) preconditioned by a
// two-level p-multigrid V-cycle, for the free system K_ff when a direct factor would be too big.
//
// The coarse level is the P1 space of the same (curved, isoparametric) mesh: a function linear in a
// triangle's reference coordinates is exactly represented by its P2 (or higher) element, so the P1
// space is a subspace of the fine one and the prolongation P just interpolates vertex values at the
// other nodes' reference positions. The coarse matrix is the Galerkin product A_c = P^T A P, assembled
// element by element and factorized once by CHOLMOD; the fine level is smoothed by one forward
// Gauss-Seidel sweep before and one backward sweep after the coarse correction, which keeps the
// V-cycle symmetric positive definite, as CG needs. The columns (one per conductor) run in lockstep,
// side by side in memory, and the free unknowns come numbered along a Hilbert curve (partition_nodes),
// so each row's neighbours are read from cache. Products and reductions run on all threads and give
// the same bits for any thread count; the Gauss-Seidel sweeps are sequential.
// Sources: Ronquist & Patera, Int. J. Numer. Methods Eng. 24 (1987) (p-multigrid for spectral
// elements); Helenbrook, Mavriplis & Atkins, AIAA J. 41 (2003) (p-multigrid for high-order FE).
//
// For an order-1 mesh the coarse space is the whole space: the V-cycle is then an exact solve and CG
// stops after one iteration, i.e. the direct solve plus two smoothing sweeps.
#pragma once

#include <memory>

#include <Eigen/Core>
#include <Eigen/SparseCore>

#include "mesh/mesh.h"
#include "solver/assembly.h"

namespace hv {

// The interpolation of free vertex values (coarse unknowns: free vertex nodes, numbered in the order
// of their numbers in `partition`)
// at every free node of the mesh; conductor vertices contribute 0 (homogeneous corrections).
Eigen::SparseMatrix<double> p1_prolongation(const Mesh& mesh, const Partition& partition);

class PMultigridSolver {
 public:
  // `A` (symmetric, both triangles stored) is the free block of the system assembled from `mesh` with
  // the open-boundary constant `far_field_c`; it must outlive the solver.
  PMultigridSolver(const Mesh& mesh, const Partition& partition, const Eigen::SparseMatrix<double>& A, double far_field_c);
  ~PMultigridSolver();
  PMultigridSolver(const PMultigridSolver&) = delete;
  PMultigridSolver& operator=(const PMultigridSolver&) = delete;

  // Solves A X = B for every column from X = 0 until ||b - A x|| <= tolerance ||b||. Returns false
  // when a column did not converge within `max_iterations`.
  bool solve(const Eigen::MatrixXd& B, double tolerance, int max_iterations, Eigen::MatrixXd& X);

  int iterations() const { return iterations_; }  // the most any column took
  long long coarse_factor_nonzeros() const;

  // Columns side by side in memory, so one pass over the matrix serves them all.
  using Block = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

 private:
  struct Coarse;
  bool solve_columns(const Eigen::MatrixXd& B, double tolerance, int max_iterations, Eigen::MatrixXd& X);
  // W: workspace of R's shape.
  void precondition(const Block& R, Block& Z, Block& W) const;
  void sweep(const Block& B, Block& X, int step) const;

  const Eigen::SparseMatrix<double>& A_;
  Eigen::VectorXd inverse_diagonal_;
  std::unique_ptr<Coarse> coarse_;
  int iterations_ = 0;
};

// y = A x for a symmetric matrix stored with both triangles (column i read as row i), rows in
// parallel; each row is one sequential sum, so y does not depend on the thread count.
void symmetric_multiply(const Eigen::SparseMatrix<double>& A, const Eigen::VectorXd& x, Eigen::VectorXd& y);

}  // namespace hv
