#pragma once
// The surface of a terrain raster as a flight sees it: heights at the raster's posts (a window of
// them), and where each point of the site's east/north frame falls among those posts. No file
// format here: terrain/elevation_raster.hpp reads a raster into one (GDAL).
#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <limits>
#include <utility>
#include <vector>

namespace strewn {

/// Heights (m above mean sea level) at a window of a raster's posts, row by row; NaN where the
/// raster holds no data. Post (column, row) of the window sits at post coordinates (column, row).
struct PostHeights {
  std::size_t columns = 0, rows = 0;
  std::vector<float> heights;
  [[nodiscard]] double at(std::size_t column, std::size_t row) const {
    return heights[row * columns + column];
  }
};

/// The value of a grid of `columns` x `rows` nodes (`values` row by row) at node coordinates
/// (x, y), bilinear in the four nodes around it, and its gradient per node (d/dx, d/dy); NaN
/// outside [0, columns - 1] x [0, rows - 1].
/// The cell of a grid of `count` nodes a coordinate `at` (in node units) falls in, and where in
/// it; false outside [0, count - 1]. The last node belongs to the cell before it.
inline bool grid_cell(double at, std::size_t count, std::size_t& index, double& fraction) {
  if (!(at >= 0.0) || count < 2 || at > static_cast<double>(count - 1)) return false;
  index = std::min(static_cast<std::size_t>(at), count - 2);
  fraction = at - static_cast<double>(index);
  return true;
}

template <class Value>
double bilinear_on_grid(const std::vector<Value>& values, std::size_t columns, std::size_t rows,
                        double x, double y, std::array<double, 2>& gradient) {
  std::size_t i = 0, j = 0;
  double fx = 0.0, fy = 0.0;
  if (!grid_cell(x, columns, i, fx) || !grid_cell(y, rows, j, fy))
    return std::numeric_limits<double>::quiet_NaN();
  const auto at = [&](std::size_t a, std::size_t b) {
    return static_cast<double>(values[b * columns + a]);
  };
  const double h00 = at(i, j), h10 = at(i + 1, j), h01 = at(i, j + 1), h11 = at(i + 1, j + 1);
  gradient = {(1 - fy) * (h10 - h00) + fy * (h11 - h01), (1 - fx) * (h01 - h00) + fx * (h11 - h10)};
  return (1 - fx) * (1 - fy) * h00 + fx * (1 - fy) * h10 + (1 - fx) * fy * h01 + fx * fy * h11;
}

/// Where the points of the site's frame fall among the posts: the post coordinates (column, row)
/// of the nodes of a square lattice over east, north in [-half_width, half_width], `spacing` m
/// apart, row by row from the south-west corner. Between nodes the coordinates are interpolated
/// bilinearly: a map projection bends by about spacing² / (8 × Earth's radius) over a cell (under
/// a millimetre for 100 m), so the lattice stands for the exact transformation.
struct FrameToPosts {
  double half_width = 0.0, spacing = 1.0;
  std::size_t nodes = 0;  ///< per side
  std::vector<double> column, row;
};

/// A terrain surface: the height under a point of the site's frame, bilinear between the four
/// posts around it (the usual reading of an elevation grid between its posts), and its slope.
class TerrainSurface {
 public:
  TerrainSurface(PostHeights posts, FrameToPosts frame)
      : posts_(std::move(posts)), frame_(std::move(frame)) {}

  /// The post coordinates of a point of the frame; NaN outside the lattice.
  [[nodiscard]] std::array<double, 2> post_coordinates(double east, double north) const {
    std::array<double, 2> at{};
    std::array<std::array<double, 2>, 2> unused{};
    if (!lattice(east, north, at, unused)) return {kNaN, kNaN};
    return at;
  }

  /// m above mean sea level; NaN outside the posts read or where a post holds no data.
  [[nodiscard]] double height(double east, double north) const {
    std::array<double, 2> at{};
    std::array<std::array<double, 2>, 2> jacobian{};
    if (!lattice(east, north, at, jacobian)) return kNaN;
    std::array<double, 2> gradient{};
    return bilinear(at[0], at[1], gradient);
  }

  /// d height / d east, d height / d north (NaN where the height is).
  [[nodiscard]] std::array<double, 2> slope(double east, double north) const {
    std::array<double, 2> at{};
    std::array<std::array<double, 2>, 2> jacobian{};  // d(column, row) / d(east, north)
    if (!lattice(east, north, at, jacobian)) return {kNaN, kNaN};
    std::array<double, 2> gradient{};  // d height / d(column, row)
    if (std::isnan(bilinear(at[0], at[1], gradient))) return {kNaN, kNaN};
    return {gradient[0] * jacobian[0][0] + gradient[1] * jacobian[1][0],
            gradient[0] * jacobian[0][1] + gradient[1] * jacobian[1][1]};
  }

  /// The lowest and highest height of the posts read (NaN when none holds data).
  [[nodiscard]] double lowest() const { return extreme(true); }
  [[nodiscard]] double highest() const { return extreme(false); }

  [[nodiscard]] const PostHeights& posts() const { return posts_; }
  [[nodiscard]] const FrameToPosts& frame() const { return frame_; }

 private:
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

  bool lattice(double east, double north, std::array<double, 2>& at,
               std::array<std::array<double, 2>, 2>& jacobian) const {
    const double x = (east + frame_.half_width) / frame_.spacing;
    const double y = (north + frame_.half_width) / frame_.spacing;
    std::size_t i = 0, j = 0;
    double fx = 0.0, fy = 0.0;
    if (!grid_cell(x, frame_.nodes, i, fx) || !grid_cell(y, frame_.nodes, j, fy)) return false;
    const std::size_t n = frame_.nodes;
    for (int k = 0; k < 2; ++k) {
      const std::vector<double>& v = k == 0 ? frame_.column : frame_.row;
      const double v00 = v[j * n + i], v10 = v[j * n + i + 1], v01 = v[(j + 1) * n + i],
                   v11 = v[(j + 1) * n + i + 1];
      at[k] = (1 - fx) * (1 - fy) * v00 + fx * (1 - fy) * v10 + (1 - fx) * fy * v01 + fx * fy * v11;
      jacobian[k][0] = ((1 - fy) * (v10 - v00) + fy * (v11 - v01)) / frame_.spacing;
      jacobian[k][1] = ((1 - fx) * (v01 - v00) + fx * (v11 - v10)) / frame_.spacing;
    }
    return true;
  }

  double bilinear(double column, double row, std::array<double, 2>& gradient) const {
    return bilinear_on_grid(posts_.heights, posts_.columns, posts_.rows, column, row, gradient);
  }

  double extreme(bool lowest) const {
    double out = kNaN;
    for (const float h : posts_.heights)
      if (!std::isnan(h) && (std::isnan(out) || (lowest ? h < out : h > out))) out = h;
    return out;
  }

  PostHeights posts_;
  FrameToPosts frame_;
};

}  // namespace strewn
