// Output files and folders as transactions (issue 19, findings 2-4 and 12; deliver 2): a folder
// replaced whole, the user's folders left alone, leftovers of a killed run removed, links and
// devices written through, and every "cannot" with the system's reason.
#include <doctest/doctest.h>
#include <fcntl.h>
#include <sys/file.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <unistd.h>

#include <csignal>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/io/input_file.hpp"
#include "lapwing/io/output.hpp"
#include "test_support.hpp"

using namespace lapwing;
namespace fs = std::filesystem;

namespace {

// A fresh folder under the test's scratch folder.
fs::path fresh(const std::string& name) {
  const fs::path p = fs::path(test::scratch_dir()) / name;
  fs::remove_all(p);
  fs::create_directories(p);
  return p;
}

std::string read(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

void put(const fs::path& p, const std::string& text) {
  std::ofstream(p, std::ios::binary) << text;
}

std::set<std::string> names_in(const fs::path& dir) {
  std::set<std::string> out;
  for (const auto& e : fs::directory_iterator(dir)) out.insert(e.path().filename().string());
  return out;
}

// The message of the OutputError `f` throws, or "" when it throws none.
template <typename F>
std::string output_error(F f) {
  try {
    f();
  } catch (const OutputError& e) {
    return e.what();
  }
  return "";
}

}  // namespace

TEST_CASE("an output folder is replaced whole: no file of the old set stays beside the new") {
  const fs::path base = fresh("whole");
  const fs::path out = base / "out";
  write_outputs(out, {{"summary.json", "old"}, {"trace-t-a.csv", "old a"}});
  write_outputs(out, {{"summary.json", "new"}, {"trace-t-b.csv", "new b"}});
  CHECK(names_in(out) ==
        std::set<std::string>{"summary.json", "trace-t-b.csv", output_folder_marker});
  CHECK(read(out / "summary.json") == "new");
  // The staging folder and the old one are gone: the parent holds the output folder alone.
  CHECK(names_in(base) == std::set<std::string>{"out"});
}

TEST_CASE("a folder holding something lapwing did not write is refused and left as it was") {
  const fs::path out = fresh("foreign");
  put(out / "notes.txt", "mine");
  put(out / "summary.json", "before");
  const std::string e = output_error([&] { write_outputs(out, {{"summary.json", "new"}}); });
  CHECK(e.find("will not replace") != std::string::npos);
  CHECK(e.find("notes.txt") != std::string::npos);
  CHECK(read(out / "summary.json") == "before");
  CHECK(read(out / "notes.txt") == "mine");
  CHECK(names_in(out.parent_path()).count(".foreign.lapwing-stage.") == 0);
}

TEST_CASE("a folder an earlier version wrote (only the names being written) is replaced") {
  // Before the marker existed: the output names themselves and their temporaries.
  const fs::path out = fresh("earlier");
  put(out / "summary.json", "old");
  put(out / ".summary.json.tmp.12345", "half");
  write_outputs(out, {{"summary.json", "new"}});
  CHECK(names_in(out) == std::set<std::string>{"summary.json", output_folder_marker});
}

TEST_CASE("a repeated output name is refused before the folder changes") {
  const fs::path out = fresh("twice");
  write_outputs(out, {{"summary.json", "old"}});
  const std::string e = output_error([&] { write_outputs(out, {{"a.csv", "1"}, {"a.csv", "2"}}); });
  CHECK(e == "two output files would be named a.csv");
  CHECK(read(out / "summary.json") == "old");
}

TEST_CASE("a staging folder and temporaries a killed run left are removed by the next run") {
  const fs::path base = fresh("leftovers");
  const fs::path out = base / "out";
  write_outputs(out, {{"summary.json", "old"}});
  // What a SIGKILL leaves: a staging folder beside the output folder (no process holds its lock).
  fs::create_directories(base / ".out.lapwing-stage.Ab12Cd");
  put(base / ".out.lapwing-stage.Ab12Cd" / "trace-x.csv", std::string(1000, 'x'));
  fs::create_directories(base / ".out.lapwing-stage.Ab12Cd.old");
  put(base / ".check.json.tmp.Zz99Yy", "half");
  write_outputs(out, {{"summary.json", "new"}});
  CHECK(names_in(base) == std::set<std::string>{"out", ".check.json.tmp.Zz99Yy"});
  write_file_atomic(base / "check.json", "{}");
  CHECK(names_in(base) == std::set<std::string>{"out", "check.json"});
}

TEST_CASE("a staging folder a live run holds is left alone") {
  const fs::path base = fresh("live");
  const fs::path stage = base / ".out.lapwing-stage.Live01";
  fs::create_directories(stage);
  // This process holds its lock as a run in progress does (flock locks belong to the open file
  // description, so the writer's own open of the folder cannot take it either).
  const int fd = ::open(stage.c_str(), O_RDONLY | O_DIRECTORY);
  REQUIRE(fd >= 0);
  REQUIRE(::flock(fd, LOCK_EX) == 0);
  write_outputs(base / "out", {{"summary.json", "new"}});
  CHECK(fs::is_directory(stage));
  ::close(fd);
}

TEST_CASE("runs given the same new folder or file at once all finish, and one run's set stands") {
  // Three writers start together on a folder that does not exist yet: the first to finish
  // creates it and the others replace it, as they would a folder lapwing wrote before (two of
  // three failed with "Directory not empty"). Each also removes leftovers beside it, which must
  // not take another live writer's staging folder in the moment between its making and its
  // lock ("No such file or directory"). The same for a single file.
  const fs::path base = fresh("racing");
  for (int round = 0; round < 30; ++round) {
    const fs::path out = base / ("out" + std::to_string(round));
    const fs::path file = base / ("check" + std::to_string(round) + ".json");
    std::vector<std::string> errors(3);
    std::vector<std::thread> writers;
    for (int w = 0; w < 3; ++w)
      writers.emplace_back([&, w] {
        try {
          const std::string tag = "writer " + std::to_string(w);
          write_outputs(out, {{"summary.json", tag}, {"trace.csv", tag}});
          write_file_atomic(file, tag);
        } catch (const std::exception& e) {
          errors[static_cast<std::size_t>(w)] = e.what();
        }
      });
    for (auto& t : writers) t.join();
    for (const auto& e : errors) CHECK_MESSAGE(e.empty(), e);
    // One writer's set, whole.
    CHECK(read(out / "summary.json") == read(out / "trace.csv"));
    CHECK(read(out / "summary.json").rfind("writer ", 0) == 0);
  }
  // Nothing left beside them: every staging folder and temporary was removed by its writer.
  for (const auto& e : fs::directory_iterator(base))
    CHECK_MESSAGE(e.path().filename().string()[0] != '.', e.path().string());
}

TEST_CASE(
    "an output folder given as a symlink: the folder it leads to is replaced, the link stays") {
  const fs::path base = fresh("linked-dir");
  fs::create_directories(base / "real");
  fs::create_directory_symlink("real", base / "link");
  write_outputs(base / "link", {{"summary.json", "new"}});
  CHECK(fs::is_symlink(base / "link"));
  CHECK(read(base / "real" / "summary.json") == "new");
}

TEST_CASE("a file given as a symlink: the file it leads to is replaced, the link stays") {
  const fs::path base = fresh("linked-file");
  put(base / "real.json", "old");
  fs::create_symlink("real.json", base / "link.json");
  write_file_atomic(base / "link.json", "new");
  CHECK(fs::is_symlink(base / "link.json"));
  CHECK(read(base / "real.json") == "new");
}

TEST_CASE("a pipe is written through, never replaced by a file") {
  const fs::path base = fresh("fifo");
  const fs::path fifo = base / "pipe";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  // Held open for reading and writing here, so that the writer's open does not wait for a reader.
  const int fd = ::open(fifo.c_str(), O_RDWR | O_NONBLOCK);
  REQUIRE(fd >= 0);
  write_file_atomic(fifo, "through");
  char buf[16] = {};
  CHECK(::read(fd, buf, sizeof buf) == 7);
  CHECK(std::string(buf) == "through");
  ::close(fd);
  struct stat st;
  REQUIRE(::lstat(fifo.c_str(), &st) == 0);
  CHECK(S_ISFIFO(st.st_mode));
  CHECK(names_in(base) == std::set<std::string>{"pipe"});
}

TEST_CASE("a path to one of the process's descriptors (/dev/stdout's form) writes to it") {
  int p[2];
  REQUIRE(::pipe(p) == 0);
  write_file_atomic("/proc/self/fd/" + std::to_string(p[1]), "to the pipe");
  char buf[32] = {};
  CHECK(::read(p[0], buf, sizeof buf) == 11);
  CHECK(std::string(buf) == "to the pipe");
  ::close(p[0]);
  ::close(p[1]);
}

TEST_CASE("a folder or a link that leads nowhere is refused as a file") {
  const fs::path base = fresh("refused");
  fs::create_directories(base / "dir");
  CHECK(output_error([&] { write_file_atomic(base / "dir", "x"); }).find("it is a folder") !=
        std::string::npos);
  fs::create_symlink("missing/x.json", base / "dangling.json");
  // The reason is the system's (strerror(ENOENT)).
  CHECK(output_error([&] {
          write_file_atomic(base / "dangling.json", "x");
        }).find("No such file or directory") != std::string::npos);
}

TEST_CASE("cannot write or create says why (errno text)") {
  const fs::path base = fresh("why");
  put(base / "file", "a file, not a folder");
  // strerror(ENOTDIR) on glibc: "Not a directory".
  CHECK(output_error([&] { write_file_atomic(base / "file" / "x.json", "x"); }) ==
        "cannot write " + (base / "file" / "x.json").string() + ": Not a directory");
  CHECK(output_error([&] {
          write_outputs(base / "file", {{"a", "b"}});
        }) == "cannot create " + (base / "file").string() + ": it is not a folder");
  CHECK(output_error([&] {
          write_outputs(base / "file" / "out", {{"a", "b"}});
        }).find("cannot create " + (base / "file" / "out").string() + ": ") == 0);
}

TEST_CASE("a write that fails midway leaves no folder it made, and says why") {
  const fs::path base = fresh("made");
  // A name longer than a file system takes (NAME_MAX, 255 bytes on Linux's file systems) fails
  // after the parents and the staging folder exist.
  const std::string long_name(300, 'n');
  const std::string e = output_error([&] {
    write_outputs(base / "a" / "b" / "out", {{"x.csv", "1"}, {long_name, "2"}});
  });
  CHECK(e.find("File name too long") != std::string::npos);  // strerror(ENAMETOOLONG), glibc
  CHECK(names_in(base).empty());
}

TEST_CASE("files written beside others: each replaced atomically, the rest of the folder kept") {
  const fs::path base = fresh("beside");
  put(base / "other.yaml", "kept");
  write_files_atomic(base, {{"lap.csv", "data"}, {"lap.yaml", "track"}});
  CHECK(names_in(base) == std::set<std::string>{"lap.csv", "lap.yaml", "other.yaml"});
  CHECK(read(base / "lap.yaml") == "track");
}

// The inputs a command reads are never replaced or removed by its outputs (io/input_file.hpp,
// InputLedger): the review's cases of a log, a car and a store overwritten, and of a car deleted
// with the --out folder it was read from.
TEST_CASE("an output that is an input read under a ledger is refused; the input is kept") {
  const fs::path base = fresh("inputs");
  put(base / "lap.csv", "the log");
  fs::create_symlink("lap.csv", base / "link.csv");
  {
    const InputLedger ledger;
    (void)open_input((base / "lap.csv").string());  // recorded as read
    const std::string e = output_error([&] { write_file_atomic(base / "link.csv", "x"); });
    CHECK(e == "cannot write " + (base / "link.csv").string() + ": it would replace " +
                   (base / "lap.csv").string() +
                   ", which this command reads (write it to another name)");
    CHECK(output_error([&] {
            write_files_atomic(base, {{"other.yaml", "y"}, {"lap.csv", "x"}});
          }).find("which this command reads") != std::string::npos);
    CHECK(read(base / "lap.csv") == "the log");
    // write_files_atomic checked every file before writing any: other.yaml was not written.
    CHECK(names_in(base) == std::set<std::string>{"lap.csv", "link.csv"});
  }
  // Outside a ledger (a program using the library) nothing is recorded or refused.
  write_file_atomic(base / "lap.csv", "replaced");
  CHECK(read(base / "lap.csv") == "replaced");
}

TEST_CASE("an output folder holding an input read under a ledger is not replaced") {
  const fs::path base = fresh("inside");
  const fs::path out = base / "fitted";
  write_outputs(out, {{"fit.json", "{}"}, {"car.yaml", "the car"}});
  fs::create_directory_symlink("fitted", base / "link");
  for (const fs::path& read_as : {out / "car.yaml", base / "link" / "car.yaml"}) {
    const InputLedger ledger;
    note_input(read_as.string());
    const std::string e = output_error([&] { write_outputs(out, {{"summary.json", "new"}}); });
    CHECK(e == "will not replace " + out.string() + ": it holds " + read_as.string() +
                   ", which this command reads (write to another folder)");
    CHECK(read(out / "car.yaml") == "the car");
  }
  // An input beside the folder (not in it) stops nothing.
  put(base / "car.yaml", "another car");
  const InputLedger ledger;
  note_input((base / "car.yaml").string());
  write_outputs(out, {{"summary.json", "new"}});
  CHECK(names_in(out) == std::set<std::string>{"summary.json", output_folder_marker});
}

TEST_CASE("a write that fails removes its temporary and the folders it made") {
  const fs::path base = fresh("parents");
  write_file_atomic(base / "a" / "b" / "c.json", "x");
  CHECK(read(base / "a" / "b" / "c.json") == "x");
  // A file size limit of 1 KiB makes write(2) fail with EFBIG past it, as a full disk fails
  // with ENOSPC, after the folders and the temporary are made (SIGXFSZ ignored, as a full disk
  // sends none); the limit is restored before any check.
  struct rlimit old;
  REQUIRE(::getrlimit(RLIMIT_FSIZE, &old) == 0);
  const auto previous = std::signal(SIGXFSZ, SIG_IGN);
  struct rlimit small = old;
  small.rlim_cur = 1024;
  REQUIRE(::setrlimit(RLIMIT_FSIZE, &small) == 0);
  const std::string big(4096, 'x');
  const std::string e1 = output_error([&] { write_file_atomic(base / "a" / "b" / "c.json", big); });
  const std::string e2 = output_error([&] { write_file_atomic(base / "d" / "e" / "c.json", big); });
  const std::string e3 = output_error([&] { write_outputs(base / "f" / "out", {{"t.csv", big}}); });
  ::setrlimit(RLIMIT_FSIZE, &old);
  std::signal(SIGXFSZ, previous);
  // strerror(EFBIG) on glibc: "File too large".
  CHECK(e1 == "cannot write " + (base / "a" / "b" / "c.json").string() + ": File too large");
  CHECK(e2 == "cannot write " + (base / "d" / "e" / "c.json").string() + ": File too large");
  CHECK(e3 == "cannot write " + (base / "f" / "out" / "t.csv").string() + ": File too large");
  CHECK(names_in(base) == std::set<std::string>{"a"});
  CHECK(names_in(base / "a" / "b") == std::set<std::string>{"c.json"});
  CHECK(read(base / "a" / "b" / "c.json") == "x");
}
