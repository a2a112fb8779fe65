// Loading liblapwing_fit.so (fit_module.hpp).
#include <dlfcn.h>

#include <filesystem>
#include <mutex>
#include <string>
#include <system_error>

#include "fit_module.hpp"
#include "lapwing/base/version.hpp"

namespace lapwing::cli {

namespace {

namespace fs = std::filesystem;

constexpr const char* module_name = "liblapwing_fit.so";

// Why the module at `path` is not the one this binary can call; empty where it is, and then
// `out` holds its function.
std::string try_module(const fs::path& path, FitFunction& out) {
  std::error_code ec;
  if (!fs::exists(path, ec)) return "not found";
  // Kept loaded for the rest of the process (never closed): its function is called after.
  void* handle = dlopen(path.c_str(), RTLD_NOW | RTLD_LOCAL);
  if (!handle) {
    const char* why = dlerror();
    return why ? why : "it cannot be loaded";
  }
  using Entry = const FitModule* (*)();
  const auto entry = reinterpret_cast<Entry>(dlsym(handle, "lapwing_fit_module"));
  if (!entry) return "it has no lapwing_fit_module (not lapwing's fit module)";
  const FitModule* m = entry();
  if (version() != m->version)
    return "it is of lapwing " + std::string(m->version) + ", this binary is " + version();
  if (m->sizes != fit_module_sizes)
    return "it is of another build of lapwing " + version() + " (its types' sizes differ)";
  out = m->fit;
  return {};
}

FitFunction load() {
  std::error_code ec;
  const fs::path exe = fs::read_symlink("/proc/self/exe", ec);
  if (ec)
    throw FitModuleMissing("the fit module (" + std::string(module_name) +
                           ") cannot be looked for: the binary's own path is unknown (" +
                           ec.message() + ")");
  const fs::path dir = exe.parent_path();
  // The install's <libdir>/lapwing, from the binary's <bindir> (CMakeLists.txt): relative to it,
  // or absolute.
  const fs::path installed = LAPWING_FIT_MODULE_DIR;
  const fs::path places[] = {dir / module_name, (dir / installed) / module_name};
  std::string tried;
  for (const fs::path& place : places) {
    const fs::path p = place.lexically_normal();
    FitFunction f = nullptr;
    const std::string why = try_module(p, f);
    if (why.empty()) return f;
    tried += (tried.empty() ? "" : "; ") + p.string() + ": " + why;
  }
  throw FitModuleMissing("fit needs its module, " + std::string(module_name) +
                         ", beside the binary or in the install's <libdir>/lapwing (build or "
                         "install lapwing again): " +
                         tried);
}

}  // namespace

FitFunction fit_function() {
  static std::once_flag once;
  static FitFunction f = nullptr;
  std::call_once(once, [] { f = load(); });
  return f;
}

}  // namespace lapwing::cli
