// Where each value of a loaded file stands. The model and the physics know no file positions:
// their rules name a value by its key path ("tyres.mu_lat", "segments[2].arc.radius"), and the
// loader that read the file maps that path back to FILE:LINE:COL and to the value's text as
// written, so that the error reads as if the loader had found it.
#pragma once

#include <map>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/base/violation.hpp"
#include "lapwing/io/document.hpp"

namespace lapwing {

class SourceMap {
 public:
  SourceMap() = default;
  /// Every node of the document by its key path ("" the root, "a.b", "a[2]").
  explicit SourceMap(const Document& doc);
  /// The same, the paths indexed on first use (a position or a text asked for: an error): a
  /// file read without one, a long track's, pays nothing for them. The document is kept.
  explicit SourceMap(std::shared_ptr<const Document> doc);

  const std::string& file() const { return file_; }

  /// Key paths of the model under `model_path` are written under `file_path` in this file (a
  /// power curve, which the model holds as torque; a straight given as a bare length).
  void alias(std::string model_path, std::string file_path);
  /// `path` as this file writes it (aliases applied).
  std::string file_path(std::string_view path) const;

  /// Position of the node at `path`, or of the nearest node that holds it (a key left to its
  /// default); the whole file when there is none.
  Mark mark(std::string_view path) const;
  /// The value's text as written, when `path` is a scalar of the file.
  std::optional<std::string> text(std::string_view path) const;

  /// The rows of a data file (CSV) this file names under `path` ("centerline"): a data point
  /// "PATH.points[i]" is FILE line lines[i].
  void data(std::string path, std::string file, std::vector<int> lines);

  /// A violation of one of this file's values as its error: FILE:LINE:COL: error: MESSAGE
  /// (KEY.PATH), the values as the file wrote them.
  InputError error(const Violation& v) const;

 private:
  struct Entry {
    Mark mark;
    std::optional<std::string> text;
  };
  struct DataFile {
    std::string file;
    std::vector<int> lines;
  };
  using Nodes = std::map<std::string, Entry, std::less<>>;
  // The index, shared by copies; built once (at construction, or on first use of a lazy map).
  struct Index {
    std::once_flag built;
    Nodes nodes;
  };
  std::optional<std::string> point_name(const std::string& path) const;
  const Nodes& nodes() const;
  static void fill(Nodes& nodes, const Document& doc);
  std::string file_;
  std::shared_ptr<const Document> doc_;  // a lazy map's document
  std::shared_ptr<Index> index_;
  std::vector<std::pair<std::string, std::string>> aliases_;
  std::map<std::string, DataFile, std::less<>> data_;
};

/// The source maps of the files a command loaded, found by the subject an InvalidInput names
/// (the file), so that an error the library finds later (a ride-height map that does not
/// converge, a start speed too high) is reported at its place in the file.
class SourceMaps {
 public:
  void add(SourceMap map) { maps_.push_back(std::move(map)); }
  /// `e` at its place when a map of its subject is known; else without a position.
  InputError error(const InvalidInput& e) const;

 private:
  std::vector<SourceMap> maps_;
};

}  // namespace lapwing
