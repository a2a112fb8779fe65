// report.html: well-formed (parsed here as XML), the expected plots by id, nothing fetched.
#include <doctest/doctest.h>

#include <cctype>
#include <set>
#include <stdexcept>
#include <string>
#include <vector>

#include "lapwing/report/cells.hpp"
#include "lapwing/report/html_report.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/svg.hpp"
#include "lapwing/study/trade.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {

// A strict little XML reader: every element closed in order, attributes quoted and unique,
// entities well-formed, no stray '<' or '&'. The report is written to pass it (so it is also
// well-formed HTML). Returns the ids of all elements.
std::set<std::string> parse_xml(const std::string& s) {
  std::set<std::string> ids;
  std::vector<std::string> stack;
  std::size_t i = 0;
  auto fail = [&](const std::string& what) {
    throw std::runtime_error(what + " at offset " + std::to_string(i) + ": " + s.substr(i, 60));
  };
  auto name_char = [](char c) {
    return std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == ':';
  };
  auto entity = [&] {
    const std::size_t end = s.find(';', i);
    if (end == std::string::npos || end - i > 10) fail("bad entity");
    const std::string e = s.substr(i + 1, end - i - 1);
    const bool numeric =
        e.size() > 1 && e[0] == '#' && e.find_first_not_of("0123456789", 1) == std::string::npos;
    if (!numeric && e != "amp" && e != "lt" && e != "gt" && e != "quot" && e != "apos")
      fail("unknown entity &" + e + ";");
    i = end + 1;
  };
  if (s.rfind("<!DOCTYPE html>", 0) == 0) i = 15;
  while (i < s.size()) {
    if (s[i] == '&') {
      entity();
      continue;
    }
    if (s[i] != '<') {
      ++i;
      continue;
    }
    if (s.compare(i, 2, "</") == 0) {
      std::size_t j = i + 2;
      while (j < s.size() && name_char(s[j])) ++j;
      const std::string name = s.substr(i + 2, j - i - 2);
      if (stack.empty() || stack.back() != name) fail("mismatched </" + name + ">");
      stack.pop_back();
      if (j >= s.size() || s[j] != '>') fail("bad end tag");
      i = j + 1;
      continue;
    }
    std::size_t j = i + 1;
    while (j < s.size() && name_char(s[j])) ++j;
    const std::string name = s.substr(i + 1, j - i - 1);
    if (name.empty()) fail("bad tag");
    std::set<std::string> attrs;
    i = j;
    while (true) {
      while (i < s.size() && std::isspace(static_cast<unsigned char>(s[i]))) ++i;
      if (i >= s.size()) fail("unterminated tag");
      if (s.compare(i, 2, "/>") == 0) {
        i += 2;
        break;
      }
      if (s[i] == '>') {
        ++i;
        stack.push_back(name);
        // Style text is CSS and script text is JavaScript or JSON: skip to the end tag (they
        // hold no markup; the report escapes '<' in its JSON so that no end tag can occur).
        if (name == "style" || name == "script") {
          const std::size_t end = s.find("</" + name + ">", i);
          if (end == std::string::npos) fail("unterminated " + name);
          i = end;
        }
        break;
      }
      std::size_t k = i;
      while (k < s.size() && name_char(s[k])) ++k;
      const std::string attr = s.substr(i, k - i);
      if (attr.empty() || k >= s.size() || s[k] != '=' || s[k + 1] != '"')
        fail("attribute not quoted");
      if (!attrs.insert(attr).second) fail("duplicate attribute " + attr);
      const std::size_t close = s.find('"', k + 2);
      if (close == std::string::npos) fail("unterminated attribute");
      const std::string value = s.substr(k + 2, close - k - 2);
      if (value.find('<') != std::string::npos) fail("'<' in an attribute");
      if (attr == "id") ids.insert(value);
      i = close + 1;
    }
  }
  if (!stack.empty()) throw std::runtime_error("unclosed <" + stack.back() + ">");
  return ids;
}

}  // namespace

TEST_CASE("the compare and trade report is well-formed, holds every plot, and fetches nothing") {
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  const std::vector<Circuit> circuits{test::bundled_circuit("tracks/brannock-park.yaml"),
                                      test::bundled_circuit("tracks/cairnholt.yaml")};
  const Comparison cmp = compare(car, {0, 1}, circuits, 2);
  const Trade tr = trade(car, {0}, circuits, TradeOptions{0.02, 5, 0.15}, 2);
  const std::string html = html_report({&car, &circuits, &cmp, &tr, "test"});
  std::set<std::string> ids;
  REQUIRE_NOTHROW(ids = parse_xml(html));
  for (const char* id :
       {"lap-bars", "speed-brannock-park", "delta-brannock-park", "map-brannock-park",
        "front-share-brannock-park", "gg-brannock-park", "trade-map-brannock-park",
        "speed-cairnholt", "trade-map-cairnholt", "inputs", "summary", "trade"}) {
    CAPTURE(id);
    CHECK(ids.count(id) == 1);
  }
  // Nothing is fetched: no URL but the SVG namespace's name (an identifier the script passes
  // to createElementNS, never loaded; W3C SVG 1.1, 5.1), no script from a file, no request API.
  std::string rest = html;
  for (std::size_t at; (at = rest.find("http://www.w3.org/2000/svg")) != std::string::npos;)
    rest.erase(at, 26);
  CHECK(rest.find("http://") == std::string::npos);
  CHECK(rest.find("https://") == std::string::npos);
  CHECK(rest.find("<script src") == std::string::npos);
  for (const char* api : {"fetch(", "XMLHttpRequest", "import(", "WebSocket", "<link", "<img"}) {
    CAPTURE(api);
    CHECK(rest.find(api) == std::string::npos);
  }
  // The live traces: the script, and per track the data it draws from.
  CHECK(html.find("<script type=\"application/json\" class=\"trace-data\">") != std::string::npos);
  CHECK(html.find("document.querySelectorAll('div.traces').forEach(setup)") != std::string::npos);
  CHECK(html.find("confirm any change") == std::string::npos);  // the caution is capitalised
  CHECK(html.find("Confirm any change to a real car by testing") != std::string::npos);
  CHECK(html.find("@media print") != std::string::npos);
}

TEST_CASE("a run report has its plots and no delta or trade map") {
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const Circuit c = test::bundled_circuit("tracks/skidpad.yaml");
  const std::vector<Circuit> circuits{c};
  const Comparison one = single_lap_comparison(0, run_lap(car.configured(0), c), c);
  const std::set<std::string> ids = parse_xml(html_report({&car, &circuits, &one, nullptr, "run"}));
  CHECK(ids.count("speed-skidpad") == 1);
  CHECK(ids.count("map-skidpad") == 1);
  CHECK(ids.count("gg-skidpad") == 1);
  CHECK(ids.count("delta-skidpad") == 0);
  CHECK(ids.count("trade-map-skidpad") == 0);
}

TEST_CASE("a track whose id holds a space or any text gives element ids that references find") {
  // An element id may not hold a space (HTML Living Standard, "The id attribute"; from memory):
  // "map-my track-ramp" left the map's colour bar black and the plots unclipped (a helper's
  // finding). Every url(#X) and href="#X" on the page must name an id the page has, and no id
  // holds a space; two tracks whose ids differ only by such bytes keep two ids.
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  Circuit spaced = test::bundled_circuit("tracks/skidpad.yaml");
  spaced.track.id = "my track";
  Circuit dashed = test::bundled_circuit("tracks/skidpad.yaml");
  dashed.track.id = "my_track";
  const std::vector<Circuit> circuits{spaced, dashed};
  const Comparison cmp = compare(car, {0, 1}, circuits, 2);
  const Trade tr = trade(car, {0}, circuits, TradeOptions{0.02, 3, 0.15}, 2);
  const std::string html = html_report({&car, &circuits, &cmp, &tr, "test"});
  std::set<std::string> ids;
  REQUIRE_NOTHROW(ids = parse_xml(html));
  for (const std::string& id : ids) CHECK(id.find(' ') == std::string::npos);
  std::size_t refs = 0;
  for (const std::string open : {"url(#", "href=\"#"}) {
    const char close = open[0] == 'u' ? ')' : '"';
    for (std::size_t at = html.find(open); at != std::string::npos; at = html.find(open, at + 1)) {
      const std::size_t from = at + open.size(), to = html.find(close, from);
      const std::string target = html.substr(from, to - from);
      if (target.find('\'') != std::string::npos) continue;  // the script's own, made at run time
      CAPTURE(target);
      CHECK(ids.count(target) == 1);
      ++refs;
    }
  }
  CHECK(refs > 10);
  CHECK(ids.count("map-my_20track") == 1);
  CHECK(ids.count("map-my_5Ftrack") == 1);
}

TEST_CASE("a track without corners says 'no corners' where the table would be, not an empty one") {
  // The acceleration run (a straight, bundled) has no corner: the page once showed the
  // table's header over no rows.
  const Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  const Circuit c = test::bundled_circuit("tracks/acceleration.yaml");
  const std::vector<Circuit> circuits{c};
  const LapRun r = run_lap(car.configured(0), c);
  REQUIRE(r.summary.corners.empty());
  const Comparison one = single_lap_comparison(0, r, c);
  const std::string html = html_report({&car, &circuits, &one, nullptr, "run"});
  const std::set<std::string> ids = parse_xml(html);
  CHECK(ids.count("corners-acceleration") == 1);  // the section's anchor stays
  CHECK(html.find("<h3 id=\"corners-acceleration\">Corners</h3><p class=\"note\">no corners</p>") !=
        std::string::npos);
  CHECK(html.find("<th rowspan=\"2\">corner</th>") == std::string::npos);
}

TEST_CASE("a lap's warnings are on its report as in the text, each once, marked as warnings") {
  // The point mass on Brannock Park asks the rear axle for twice its grip under power (a lap
  // warning, summary.hpp); the page says it where the track's section starts, as the terminal
  // and summary.json do, and stays well-formed.
  Car car = load_car(test::source_path("cars/pellion-fr2.yaml"));
  car.model = VehicleModel::point_mass;
  const Circuit c = test::bundled_circuit("tracks/brannock-park.yaml");
  const std::vector<Circuit> circuits{c};
  const Comparison one = single_lap_comparison(0, run_lap(car.configured(0), c), c);
  const std::vector<std::string>& warnings = one.tracks[0].entries[0].run.summary.warnings;
  REQUIRE_FALSE(warnings.empty());
  const std::string page = html_report({&car, &circuits, &one, nullptr, "run"});
  (void)parse_xml(page);  // throws where the page is not well-formed
  for (const std::string& w : warnings) {
    const std::string shown = "<strong>warning:</strong> " + svg::escape(w) + "</p>";
    CHECK(page.find(shown) != std::string::npos);
    CHECK(page.find(shown) == page.rfind(shown));  // once
  }
}

TEST_CASE("run's single-lap page: speed, map, balance, g-g and the corners table; no bars of one") {
  const Car car = load_car(test::source_path("cars/caldra-gt.yaml"));
  const Circuit c = test::bundled_circuit("tracks/brannock-park.yaml");
  const std::vector<Circuit> circuits{c};
  const LapRun r = run_lap(car.configured(1), c);
  const Comparison one = single_lap_comparison(1, r, c);
  const std::string html = html_report({&car, &circuits, &one, nullptr, "run"});
  const std::set<std::string> ids = parse_xml(html);
  for (const char* id : {"speed-brannock-park", "map-brannock-park", "front-share-brannock-park",
                         "gg-brannock-park", "corners-brannock-park", "balance-brannock-park"}) {
    CAPTURE(id);
    CHECK(ids.count(id) == 1);
  }
  // A bar of a lap's delta to itself is zero and says nothing.
  CHECK(ids.count("lap-bars") == 0);
  // Every corner of the lap is a row with its apex speed, limit and axles (with the values).
  for (const auto& corner : r.summary.corners) {
    const std::string row = "data-corner=\"" + std::to_string(corner.id) + "\">" +
                            std::to_string(corner.id) + (corner.direction > 0 ? " L" : " R") +
                            "</a></td>";
    CAPTURE(corner.id);
    const std::size_t at = html.find(row);
    REQUIRE(at != std::string::npos);
    const std::string rest = html.substr(at, html.find("</tr>", at) - at);
    CHECK(rest.find(">" + std::string(label(corner.limit)) + "<") != std::string::npos);
    // The axle and usage cells may break after each '/' (<wbr/>).
    auto breakable = [](std::string t) {
      for (std::size_t k = 0; (k = t.find('/', k)) != std::string::npos; k += 7)
        t.replace(k, 1, "/<wbr/>");
      return t;
    };
    CHECK(rest.find(">" + breakable(axle_cell(corner)) + "<") != std::string::npos);
    CHECK(rest.find(">" + breakable(balance_index_cell(corner)) + "<") != std::string::npos);
  }
  CHECK(html.find("both within +-0.02") != std::string::npos);
  CHECK(html.find("Caldra GT") != std::string::npos);
}

TEST_CASE("the XML reader refuses what is not well-formed") {
  CHECK_THROWS(parse_xml("<a><b></a></b>"));
  CHECK_THROWS(parse_xml("<a x=1></a>"));
  CHECK_THROWS(parse_xml("<a>&nbsp;</a>"));
  CHECK_THROWS(parse_xml("<a>"));
  CHECK(parse_xml("<a id=\"q\"><b/>&amp;&#183;</a>").count("q") == 1);
}
