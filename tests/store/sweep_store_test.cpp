// The results store: rows survive a reopen and are skipped there, doubles come back bit for bit,
// another study is refused, merge joins shards of one study only, and the balance window's
// result is a column the best point inside the window is read from.
#include <doctest/doctest.h>

#include <cstdint>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "lapwing/base/error.hpp"
#include "lapwing/store/sweep_store.hpp"

using namespace lapwing;

namespace {

struct Scratch {
  std::filesystem::path dir;
  Scratch() {
    dir = std::filesystem::temp_directory_path() /
          ("lapwing-store-test-" + std::to_string(reinterpret_cast<std::uintptr_t>(this)));
    std::filesystem::remove_all(dir);
    std::filesystem::create_directories(dir);
  }
  ~Scratch() { std::filesystem::remove_all(dir); }
  std::string file(const std::string& name) const { return (dir / name).string(); }
};

StudyRecord record(const std::string& id, const std::string& shard) {
  StudyRecord s;
  s.study_id = id;
  s.version = "test";
  s.command = "test";
  s.design = "grid";
  s.shard = shard;
  s.points = 3;
  s.tracks = {"oval"};
  s.configs = {"low"};
  return s;
}

SweepRow row(std::size_t point, double lap) {
  SweepRow r;
  r.point = point;
  r.track = 0;
  r.config = 0;
  r.lap_time_s = lap;
  r.top_speed_kph = 250.0;
  r.min_speed_kph = 80.0;
  r.full_throttle_fraction = 0.6;
  r.braking_fraction = 0.1;
  return r;
}

std::string slurp(const std::string& f) {
  std::ifstream in(f);
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

}  // namespace

TEST_CASE("committed rows are held on reopening, and their doubles come back exactly") {
  const Scratch s;
  const SweepPlan plan({parse_set("mass=600kg:700kg:3")}, {});
  // 0.1 + 0.2 has no short decimal form: it must still read back to the same double.
  const double lap = 0.1 + 0.2 + 60.0;
  {
    SweepStore store(s.file("a.sqlite"), record("0000000000000001", "1/1"), plan);
    CHECK_FALSE(store.has(1));
    store.commit({row(1, lap)});
    CHECK(store.has(1));
  }
  SweepStore again(s.file("a.sqlite"), record("0000000000000001", "1/1"), plan);
  CHECK(again.has(1));
  CHECK_FALSE(again.has(0));
  export_csv(s.file("a.sqlite"), s.file("a.csv"));
  const std::string csv = slurp(s.file("a.csv"));
  const std::size_t line2 = csv.find('\n') + 1;
  CHECK(csv.substr(0, line2) ==
        "point,track,config,mass,lap_time_s,top_speed_kph,min_speed_kph,full_throttle_fraction,"
        "braking_fraction,min_front_share_200kph,balance_window,status,message\n");
  const std::string first = csv.substr(line2, csv.find(',', csv.find("650,") + 4) - line2);
  CHECK(first.rfind("1,oval,low,650,", 0) == 0);
  const double back = std::stod(first.substr(first.rfind(',') + 1));
  CHECK(back == lap);  // exact: SQLite keeps the IEEE double, the CSV its round-trip text
  const std::vector<BestPoint> best = best_points(s.file("a.sqlite"));
  REQUIRE(best.size() == 1);
  CHECK(best[0].point == 1);
  CHECK(best[0].values[0].second == "650");
}

TEST_CASE("another study is refused by the store and by merge, and nothing is written") {
  const Scratch s;
  const SweepPlan plan({parse_set("mass=600kg:700kg:3")}, {});
  { SweepStore a(s.file("a.sqlite"), record("00000000000000aa", "1/2"), plan); }
  { SweepStore b(s.file("b.sqlite"), record("00000000000000bb", "2/2"), plan); }
  CHECK_THROWS_AS(SweepStore(s.file("a.sqlite"), record("00000000000000bb", "1/1"), plan),
                  OutputError);
  CHECK_THROWS_AS(merge_stores(s.file("m.sqlite"), {s.file("a.sqlite"), s.file("b.sqlite")}),
                  OutputError);
  CHECK_FALSE(std::filesystem::exists(s.file("m.sqlite")));
}

TEST_CASE(
    "a shard of a split into 2^32 parts or more reopens as its own; a store refused is gone") {
  // A robustness campaign's: the shard's N read back from the file as a 32-bit number, so a
  // run with --shard 1/4294967297 refused the split it had just written, and the file it made
  // stayed behind. N as wide as the study's (std::size_t), and a file the store made goes
  // where it refuses it.
  const Scratch s;
  const SweepPlan plan({parse_set("mass=600kg:700kg:3")}, {});
  {
    SweepStore big(s.file("big.sqlite"), record("00000000000000dd", "1/4294967297"), plan);
    CHECK(big.created());
  }
  CHECK_NOTHROW(SweepStore(s.file("big.sqlite"), record("00000000000000dd", "1/4294967297"), plan));
  // A label that is no split (no run can share it): refused, and the new file removed.
  CHECK_THROWS_AS(SweepStore(s.file("odd.sqlite"), record("00000000000000ee", "one of two"), plan),
                  OutputError);
  CHECK_FALSE(std::filesystem::exists(s.file("odd.sqlite")));
  // A file that was there before stays, refused or not.
  CHECK_THROWS_AS(SweepStore(s.file("big.sqlite"), record("00000000000000dd", "1/3"), plan),
                  OutputError);
  CHECK(std::filesystem::exists(s.file("big.sqlite")));
}

TEST_CASE("merge joins the shards of one study, each row once") {
  const Scratch s;
  const SweepPlan plan({parse_set("mass=600kg:700kg:3")}, {});
  {
    SweepStore a(s.file("a.sqlite"), record("00000000000000cc", "1/2"), plan);
    a.commit({row(0, 61.0), row(2, 63.0)});
    SweepStore b(s.file("b.sqlite"), record("00000000000000cc", "2/2"), plan);
    b.commit({row(1, 62.0)});
  }
  merge_stores(s.file("m.sqlite"), {s.file("a.sqlite"), s.file("b.sqlite"), s.file("b.sqlite")});
  const StoreCounts c = store_counts(s.file("m.sqlite"));
  CHECK(c.rows == 3);
  CHECK(c.expected == 3);  // 3 points x 1 track x 1 config
  CHECK(best_points(s.file("m.sqlite")).at(0).lap_time_s == 61.0);
}

TEST_CASE("the balance window's result is stored per lap, and the best point inside it is found") {
  const Scratch s;
  const SweepPlan plan({parse_set("mass=600kg:700kg:3")}, {});
  {
    SweepStore store(s.file("w.sqlite"), record("00000000000000dd", "1/1"), plan);
    // The fastest lap leaves the window; the next passes; the slowest never reaches it.
    SweepRow fast = row(0, 60.0), mid = row(1, 61.0), slow = row(2, 62.0);
    fast.window = WindowResult::fail;
    mid.window = WindowResult::pass;
    slow.window = WindowResult::not_reached;
    store.commit({fast, mid, slow});
  }
  export_csv(s.file("w.sqlite"), s.file("w.csv"));
  const std::string csv = slurp(s.file("w.csv"));
  CHECK(csv.find("0,oval,low,600,60,250,80,0.6,0.1,,fail,ok,\n") != std::string::npos);
  CHECK(csv.find("1,oval,low,650,61,250,80,0.6,0.1,,pass,ok,\n") != std::string::npos);
  CHECK(csv.find("2,oval,low,700,62,250,80,0.6,0.1,,not reached,ok,\n") != std::string::npos);
  CHECK(best_points(s.file("w.sqlite")).at(0).point == 0);
  const std::vector<BestPoint> inside = best_points_in_window(s.file("w.sqlite"));
  REQUIRE(inside.size() == 1);
  CHECK(inside[0].point == 1);
  CHECK(inside[0].lap_time_s == 61.0);
}

TEST_CASE("without a window the column is NULL and no point is inside it") {
  const Scratch s;
  const SweepPlan plan({parse_set("mass=600kg:700kg:3")}, {});
  {
    SweepStore store(s.file("n.sqlite"), record("00000000000000ee", "1/1"), plan);
    store.commit({row(0, 60.0)});
  }
  export_csv(s.file("n.sqlite"), s.file("n.csv"));
  CHECK(slurp(s.file("n.csv")).find("0,oval,low,600,60,250,80,0.6,0.1,,,ok,\n") !=
        std::string::npos);
  CHECK(best_points_in_window(s.file("n.sqlite")).empty());
}
