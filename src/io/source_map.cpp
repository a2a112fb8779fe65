#include "lapwing/io/source_map.hpp"

#include "lapwing/base/format.hpp"

namespace lapwing {

namespace {

// Starts with `prefix` as a whole key path component ("a.b" is under "a", "ab" is not).
bool is_under(std::string_view path, std::string_view prefix) {
  return path.substr(0, prefix.size()) == prefix &&
         (path.size() == prefix.size() || path[prefix.size()] == '.' || path[prefix.size()] == '[');
}

// The key path that holds `path`: "a.b[2]" -> "a.b" -> "a" -> "".
std::string_view parent(std::string_view path) {
  const std::size_t cut = path.find_last_of(".[");
  return cut == std::string_view::npos ? std::string_view() : path.substr(0, cut);
}

}  // namespace

void SourceMap::fill(Nodes& nodes, const Document& doc) {
  struct Walk {
    Nodes& nodes;
    void operator()(const Node& n, const std::string& path) const {
      nodes[path] =
          Entry{n.mark,
                n.kind == Node::Kind::scalar ? std::optional<std::string>(n.scalar) : std::nullopt};
      for (const auto& [key, child] : n.entries) (*this)(child, join_path(path, key));
      for (std::size_t i = 0; i < n.items.size(); ++i)
        (*this)(n.items[i], path + "[" + std::to_string(i) + "]");
    }
  };
  Walk{nodes}(doc.root, "");
}

SourceMap::SourceMap(const Document& doc) : file_(doc.file), index_(std::make_shared<Index>()) {
  std::call_once(index_->built, [&] { fill(index_->nodes, doc); });
}

SourceMap::SourceMap(std::shared_ptr<const Document> doc)
    : file_(doc->file), doc_(std::move(doc)), index_(std::make_shared<Index>()) {}

const SourceMap::Nodes& SourceMap::nodes() const {
  static const Nodes none;
  if (!index_) return none;
  std::call_once(index_->built, [this] {
    if (doc_) fill(index_->nodes, *doc_);
  });
  return index_->nodes;
}

void SourceMap::alias(std::string model_path, std::string file_path) {
  aliases_.emplace_back(std::move(model_path), std::move(file_path));
}

std::string SourceMap::file_path(std::string_view path) const {
  // The longest alias that applies.
  const std::pair<std::string, std::string>* best = nullptr;
  for (const auto& a : aliases_)
    if (is_under(path, a.first) && (!best || a.first.size() > best->first.size())) best = &a;
  if (!best) return std::string(path);
  return best->second + std::string(path.substr(best->first.size()));
}

Mark SourceMap::mark(std::string_view path) const {
  for (std::string_view p = path;; p = parent(p)) {
    if (const auto it = nodes().find(p); it != nodes().end()) return it->second.mark;
    if (p.empty()) return Mark{};
  }
}

std::optional<std::string> SourceMap::text(std::string_view path) const {
  const auto it = nodes().find(path);
  return it == nodes().end() ? std::nullopt : it->second.text;
}

void SourceMap::data(std::string path, std::string file, std::vector<int> lines) {
  data_[std::move(path)] = DataFile{std::move(file), std::move(lines)};
}

std::optional<std::string> SourceMap::point_name(const std::string& path) const {
  // "PATH.points[i]": line i of PATH's data file.
  const std::size_t open = path.rfind(".points[");
  const std::optional<std::size_t> i = last_index(path);
  if (open == std::string::npos || !i) return std::nullopt;
  const auto it = data_.find(std::string_view(path).substr(0, open));
  if (it == data_.end() || *i >= it->second.lines.size()) return std::nullopt;
  return it->second.file + " line " + std::to_string(it->second.lines[*i]);
}

InputError SourceMap::error(const Violation& v) const {
  const ValueText text = [this](const std::string& path, double si) {
    return this->text(file_path(path)).value_or(format_readable(si));
  };
  const std::string point = v.point.empty() ? std::string() : point_name(v.point).value_or("");
  return InputError(file_, mark(file_path(v.where())), v.message(text, point), file_path(v.field));
}

InputError SourceMaps::error(const InvalidInput& e) const {
  for (const auto& m : maps_)
    if (m.file() == e.subject()) return m.error(e.violation());
  return InputError(e.subject(), Mark{}, e.message(), e.violation().field);
}

}  // namespace lapwing
