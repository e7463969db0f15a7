#include "solver/error_estimate.h"

#include <algorithm>
#include <array>
#include <cmath>

#include <Eigen/QR>

#include "solver/elements.h"

namespace hv {

namespace {

constexpr int kMaxTerms = 10;  // monomials of the cubic, the highest element order

// Sampling points for the fit, in reference coordinates. Zienkiewicz & Zhu (part 1) sample the
// gradient where it is most accurate: the Gauss points of the rule one degree below the element's.
// Order 1: the centroid; order 2: the 3-point rule of degree 2 (Strang & Fix, Dunavant p = 2);
// order 3: Dunavant's 6-point rule of degree 4 (Int. J. Numer. Methods Eng. 21, 1985, p = 4).
const std::vector<std::array<double, 2>>& sampling_points(int order) {
  static const std::vector<std::array<double, 2>> centroid = {{1.0 / 3, 1.0 / 3}};
  static const std::vector<std::array<double, 2>> three = {{1.0 / 6, 1.0 / 6}, {2.0 / 3, 1.0 / 6}, {1.0 / 6, 2.0 / 3}};
  constexpr double a = 0.445948490915965, b = 0.091576213509771;
  static const std::vector<std::array<double, 2>> six = {{a, a}, {1 - 2 * a, a}, {a, 1 - 2 * a},
                                                         {b, b}, {1 - 2 * b, b}, {b, 1 - 2 * b}};
  return order == 1 ? centroid : order == 2 ? three : six;
}

// Number of monomials r^i z^j with i + j <= degree.
constexpr int polynomial_terms(int degree) { return (degree + 1) * (degree + 2) / 2; }

// The monomials of a complete polynomial of `degree` at (x, y), in a fixed order.
void monomials(int degree, double x, double y, double* out) {
  int k = 0;
  for (int total = 0; total <= degree; ++total)
    for (int j = 0; j <= total; ++j) out[k++] = std::pow(x, total - j) * std::pow(y, j);
}

// grad(u_h) at a sampled point of a triangle.
Eigen::Vector2d gradient_at(const TriangleSample& s, const int* node, const Eigen::VectorXd& u) {
  Eigen::Vector2d g = Eigen::Vector2d::Zero();
  for (int i = 0; i < s.n; ++i) g += u[node[i]] * Eigen::Vector2d(s.dN_dr[i], s.dN_dz[i]);
  return g;
}

// The triangles that share each vertex (compressed rows over all nodes; mid nodes get none).
struct VertexTriangles {
  std::vector<int> start, triangles;
  VertexTriangles(const Mesh& mesh) : start(static_cast<size_t>(mesh.n_nodes()) + 1, 0) {
    for (int t = 0; t < mesh.n_triangles(); ++t)
      for (int k = 0; k < 3; ++k) ++start[static_cast<size_t>(mesh.triangle(t)[k]) + 1];
    for (size_t v = 1; v < start.size(); ++v) start[v] += start[v - 1];
    triangles.resize(static_cast<size_t>(start.back()));
    std::vector<int> fill(start.begin(), start.end() - 1);
    for (int t = 0; t < mesh.n_triangles(); ++t)
      for (int k = 0; k < 3; ++k) triangles[static_cast<size_t>(fill[static_cast<size_t>(mesh.triangle(t)[k])]++)] = t;
  }
  template <class F>
  void for_each(int vertex, F f) const {
    for (int i = start[static_cast<size_t>(vertex)]; i < start[static_cast<size_t>(vertex) + 1]; ++i)
      f(triangles[static_cast<size_t>(i)]);
  }
};

// One recovery patch: a polynomial fitted around `center` in coordinates scaled by `scale`.
struct Patch {
  int vertex = -1, region = -1;
  Point center;
  double scale = 1.0;
  Eigen::Matrix<double, Eigen::Dynamic, 2> coefficients;

  Eigen::Vector2d at(int degree, const Point& x) const {
    double m[kMaxTerms];
    monomials(degree, (x.r - center.r) / scale, (x.z - center.z) / scale, m);
    Eigen::Vector2d g = Eigen::Vector2d::Zero();
    for (int k = 0; k < coefficients.rows(); ++k) g += m[k] * coefficients.row(k).transpose();
    return g;
  }
};

// The triangles of `region` around `vertex`, grown by layers of neighbours (same region) until the
// patch has twice as many sampling points as the polynomial has terms, and spans it (a boundary
// vertex may touch only one or two triangles; Zienkiewicz & Zhu, part 2, recover there from larger
// patches too).
std::vector<int> patch_triangles(const Mesh& mesh, const VertexTriangles& around, int vertex, int region) {
  std::vector<int> patch;
  around.for_each(vertex, [&](int t) {
    if (mesh.triangle_region[static_cast<size_t>(t)] == region) patch.push_back(t);
  });
  const size_t wanted = 2 * static_cast<size_t>(polynomial_terms(mesh.order));
  const size_t per_triangle = sampling_points(mesh.order).size();
  for (int layer = 0; layer < 3 && patch.size() * per_triangle < wanted; ++layer) {
    std::vector<int> grown = patch;
    for (int t : patch)
      for (int k = 0; k < 3; ++k)
        around.for_each(mesh.triangle(t)[k], [&](int n) {
          if (mesh.triangle_region[static_cast<size_t>(n)] == region) grown.push_back(n);
        });
    std::sort(grown.begin(), grown.end());
    grown.erase(std::unique(grown.begin(), grown.end()), grown.end());
    if (grown.size() == patch.size()) break;
    patch = std::move(grown);
  }
  return patch;
}

// Least-squares fit of grad(u_h) at the patch's sampling points. Falls back to lower degrees when
// the points do not determine the full polynomial (a thin patch along a boundary).
Patch fit_patch(const Mesh& mesh, const Eigen::VectorXd& u, const std::vector<int>& triangles, int vertex,
                int region) {
  Patch patch;
  patch.vertex = vertex, patch.region = region;
  patch.center = mesh.nodes[static_cast<size_t>(vertex)];
  std::vector<Point> points;
  std::vector<Eigen::Vector2d> values;
  for (int t : triangles)
    for (const auto& p : sampling_points(mesh.order)) {
      const TriangleSample s = sample_triangle(mesh, t, p[0], p[1]);
      points.push_back(s.at);
      values.push_back(gradient_at(s, mesh.triangle(t), u));
    }
  patch.scale = 0.0;
  for (const Point& x : points) patch.scale = std::max(patch.scale, std::hypot(x.r - patch.center.r, x.z - patch.center.z));
  const int rows = static_cast<int>(points.size());
  for (int degree = mesh.order; degree >= 0; --degree) {
    const int terms = polynomial_terms(degree);
    if (rows < terms) continue;
    Eigen::MatrixXd A(rows, terms);
    Eigen::Matrix<double, Eigen::Dynamic, 2> b(rows, 2);
    for (int i = 0; i < rows; ++i) {
      double m[kMaxTerms];
      const Point& x = points[static_cast<size_t>(i)];
      monomials(degree, (x.r - patch.center.r) / patch.scale, (x.z - patch.center.z) / patch.scale, m);
      for (int k = 0; k < terms; ++k) A(i, k) = m[k];
      b.row(i) = values[static_cast<size_t>(i)].transpose();
    }
    Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(A);
    qr.setThreshold(1e-8);
    if (qr.rank() < terms) continue;
    patch.coefficients = qr.solve(b);
    return patch;
  }
  patch.coefficients = Eigen::Matrix<double, 1, 2>::Zero();
  return patch;
}

// All patches, one per (vertex, region of a triangle at it); `index[v]` lists (region, patch) pairs.
struct Patches {
  std::vector<Patch> all;
  std::vector<std::vector<std::pair<int, int>>> index;

  const Patch& of(int vertex, int region) const {
    for (const auto& [r, p] : index[static_cast<size_t>(vertex)])
      if (r == region) return all[static_cast<size_t>(p)];
    return all.front();  // unreachable: every triangle's vertex has a patch of its region
  }
};

Patches fit_all_patches(const Mesh& mesh, const Eigen::VectorXd& u) {
  const VertexTriangles around(mesh);
  Patches patches;
  patches.index.resize(static_cast<size_t>(mesh.n_nodes()));
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int region = mesh.triangle_region[static_cast<size_t>(t)];
    for (int k = 0; k < 3; ++k) {
      auto& list = patches.index[static_cast<size_t>(mesh.triangle(t)[k])];
      if (std::none_of(list.begin(), list.end(), [&](const auto& e) { return e.first == region; })) {
        list.emplace_back(region, static_cast<int>(patches.all.size()));
        patches.all.push_back({mesh.triangle(t)[k], region, {}, 1.0, {}});
      }
    }
  }
  const long n = static_cast<long>(patches.all.size());
#pragma omp parallel for schedule(dynamic, 64)
  for (long i = 0; i < n; ++i) {
    Patch& patch = patches.all[static_cast<size_t>(i)];
    patch = fit_patch(mesh, u, patch_triangles(mesh, around, patch.vertex, patch.region), patch.vertex, patch.region);
  }
  return patches;
}

}  // namespace

double ErrorEstimate::relative() const {
  const double total = std::hypot(global, energy_norm);
  return total > 0 ? global / total : 0.0;
}

std::vector<Eigen::Vector2d> recovered_gradient(const Mesh& mesh, const Eigen::VectorXd& potential) {
  const Patches patches = fit_all_patches(mesh, potential);
  const int n = mesh.nodes_per_triangle();
  std::vector<Eigen::Vector2d> out(static_cast<size_t>(mesh.n_triangles()) * static_cast<size_t>(n));
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* node = mesh.triangle(t);
    const int region = mesh.triangle_region[static_cast<size_t>(t)];
    for (int k = 0; k < n; ++k) {
      // A vertex takes its own patch's value; a node on an edge or inside averages the patches of
      // the vertices it lies between (its non-zero barycentric coordinates), as in Zienkiewicz & Zhu
      // (part 1) for quadratic elements. Neighbours sharing the edge then agree: G* is continuous.
      double xi = 0, eta = 0;
      triangle_node_reference(mesh.order, k, &xi, &eta);
      const double barycentric[3] = {1 - xi - eta, xi, eta};
      Eigen::Vector2d sum = Eigen::Vector2d::Zero();
      int count = 0;
      for (int v = 0; v < 3; ++v) {
        if (barycentric[v] < 1e-12) continue;
        sum += patches.of(node[v], region).at(mesh.order, mesh.nodes[static_cast<size_t>(node[k])]);
        ++count;
      }
      out[static_cast<size_t>(t) * static_cast<size_t>(n) + static_cast<size_t>(k)] = sum / count;
    }
  }
  return out;
}

ErrorEstimate zz_error_estimate(const Mesh& mesh, const Eigen::VectorXd& potential) {
  const std::vector<Eigen::Vector2d> recovered = recovered_gradient(mesh, potential);
  const int n = mesh.nodes_per_triangle();
  ErrorEstimate estimate;
  estimate.element.assign(static_cast<size_t>(mesh.n_triangles()), 0.0);
  std::vector<double> energy(static_cast<size_t>(mesh.n_triangles()), 0.0);
#pragma omp parallel for schedule(static)
  for (int t = 0; t < mesh.n_triangles(); ++t) {
    const int* node = mesh.triangle(t);
    const Eigen::Vector2d* g_star = &recovered[static_cast<size_t>(t) * static_cast<size_t>(n)];
    const double eps = kEpsilon0 * mesh.regions[static_cast<size_t>(mesh.triangle_region[static_cast<size_t>(t)])].permittivity;
    double error2 = 0.0, norm2 = 0.0;
    for (const TrianglePoint& q : triangle_rule(mesh.order)) {
      const TriangleSample s = sample_triangle(mesh, t, q.xi, q.eta);
      const Eigen::Vector2d g_h = gradient_at(s, node, potential);
      Eigen::Vector2d g = Eigen::Vector2d::Zero();
      for (int k = 0; k < s.n; ++k) g += s.N[k] * g_star[k];
      const double weight = eps * 2 * kPi * s.at.r * s.detJ * q.weight;
      error2 += weight * (g - g_h).squaredNorm();
      norm2 += weight * g_h.squaredNorm();
    }
    estimate.element[static_cast<size_t>(t)] = std::sqrt(error2);
    energy[static_cast<size_t>(t)] = norm2;
  }
  // Sums in triangle order: the same figures with any number of threads.
  double error2 = 0.0, norm2 = 0.0;
  for (size_t t = 0; t < energy.size(); ++t) {
    error2 += estimate.element[t] * estimate.element[t];
    norm2 += energy[t];
  }
  estimate.global = std::sqrt(error2);
  estimate.energy_norm = std::sqrt(norm2);
  return estimate;
}

}  // namespace hv
