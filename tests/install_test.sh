#!/usr/bin/env bash
# The installed package works for a program outside the project: install the built library into a
# temporary prefix, configure and build examples/library/ against it as a separate CMake project
# (find_package(lapwing CONFIG REQUIRED), lapwing::core; nothing fetched), run it on a bundled
# car, track and config, and check that its lap time is the one `lapwing run` writes to
# summary.json, to the last bit (both are the same library code on the same inputs, so the
# doubles must be equal; the example prints the shortest round-trip text, summary.json too).
#   install_test.sh BUILD_DIR SOURCE_DIR LAPWING_BINARY GENERATOR CXX_COMPILER BUILD_TYPE [CMAKE_ARG...]
# Extra CMAKE_ARGs go to the example's configure step (the sanitize preset's link flags).
set -u
build=$(realpath "$1")
src=$(realpath "$2")
bin=$(realpath "$3")
generator=$4
cxx=$5
build_type=$6
shift 6
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail=0
prefix=$tmp/prefix

cmake --install "$build" --prefix "$prefix" > "$tmp/install.log" 2>&1 ||
  { echo "FAIL: cmake --install: $(tail -5 "$tmp/install.log")"; exit 1; }

# What the package holds: headers with the umbrella, a static library per layer, the config.
for f in include/lapwing/lapwing.hpp include/lapwing/solve/solver.hpp \
  lib/cmake/lapwing/lapwingConfig.cmake lib/cmake/lapwing/lapwingConfigVersion.cmake \
  lib/cmake/lapwing/lapwingTargets.cmake; do
  [ -e "$prefix/$f" ] || { echo "FAIL: the install lacks $f"; fail=1; }
done
# The command line and fit's module, which the installed binary finds in lib/lapwing.
for f in bin/lapwing lib/lapwing/liblapwing_fit.so; do
  [ -e "$prefix/$f" ] || { echo "FAIL: the install lacks $f"; fail=1; }
done
"$prefix/bin/lapwing" fit --car "$src/cars/pellion-fr2.yaml" \
  --track "$src/tracks/brannock-park-survey.yaml" --config medium \
  --log "$src/logs/brannock-park-survey-lap.csv" --speed speed_kph --time time_s --free power \
  --out "$tmp/fit" > "$tmp/fit.txt" 2>&1 && [ -s "$tmp/fit/fit.json" ] ||
  { echo "FAIL: the installed lapwing fit: $(tail -3 "$tmp/fit.txt")"; fail=1; }
for layer in base model path io solve study store report; do
  [ -e "$prefix/lib/liblapwing_$layer.a" ] || { echo "FAIL: no lib/liblapwing_$layer.a"; fail=1; }
done
# Relocatable: the package names neither the source tree nor the build tree (a consumer on
# another machine has neither).
if grep -rlF -e "$src" -e "$build" "$prefix/lib/cmake"; then
  echo "FAIL: the installed CMake files above name the source or build tree"
  fail=1
fi
# Boost is header-only and private: the package must not ask its users for it.
if grep -rn 'Boost' "$prefix/lib/cmake/lapwing/lapwingTargets.cmake"; then
  echo "FAIL: the exported targets name Boost (above)"
  fail=1
fi

# The example, configured on its own: only the prefix to find lapwing in, no package registry;
# warnings as errors, as lapwing's own code is built.
cmake -S "$src/examples/library" -B "$tmp/example" -G "$generator" \
  -DCMAKE_CXX_COMPILER="$cxx" -DCMAKE_BUILD_TYPE="$build_type" \
  -DCMAKE_CXX_FLAGS="-Wall -Wextra -Wpedantic -Wshadow -Werror" \
  -DCMAKE_PREFIX_PATH="$prefix" -DCMAKE_FIND_USE_PACKAGE_REGISTRY=OFF \
  -DFETCHCONTENT_FULLY_DISCONNECTED=ON "$@" > "$tmp/configure.log" 2>&1 ||
  { echo "FAIL: configuring the example:"; tail -20 "$tmp/configure.log"; exit 1; }
found=$(sed -n 's/^lapwing_DIR:PATH=//p' "$tmp/example/CMakeCache.txt")
[ "$found" = "$prefix/lib/cmake/lapwing" ] ||
  { echo "FAIL: the example found lapwing at '$found', not in the install"; fail=1; }
# The package found its own dependencies (lapwingConfig.cmake's find_dependency), the example
# asked for none.
for dep in Eigen3 yaml-cpp; do
  grep -q "^${dep}_DIR:PATH=/" "$tmp/example/CMakeCache.txt" ||
    { echo "FAIL: the package did not find $dep for the example"; fail=1; }
done
cmake --build "$tmp/example" -j1 > "$tmp/build.log" 2>&1 ||
  { echo "FAIL: building the example:"; tail -30 "$tmp/build.log"; exit 1; }

# One lap each way; the default model (no --model), as the example uses.
car=$src/cars/caldra-gt.yaml
track=$src/tracks/brannock-park.yaml
config=high_downforce
"$tmp/example/lap_time" "$car" "$track" "$config" > "$tmp/example.txt" ||
  { echo "FAIL: the example exited $?"; fail=1; }
"$bin" run --car "$car" --track "$track" --config "$config" --out "$tmp/run" > /dev/null ||
  { echo "FAIL: lapwing run exited $?"; fail=1; }
# The other model, to show that the comparison tells the models apart (else an equal time would
# not prove the example used run's default).
default_model=$(head -1 "$tmp/example.txt" | grep -oE '(axle|point-mass) model' | cut -d' ' -f1)
other_model=$([ "$default_model" = axle ] && echo point-mass || echo axle)
"$bin" run --car "$car" --track "$track" --config "$config" --model "$other_model" \
  --out "$tmp/other" > /dev/null || { echo "FAIL: lapwing run --model $other_model exited $?"; fail=1; }

python3 - "$tmp/example.txt" "$tmp/run/summary.json" "$tmp/other/summary.json" <<'PY' || fail=1
import json, sys
lines = open(sys.argv[1]).read().splitlines()
printed = lines[-1]
example = float(printed)
run = json.load(open(sys.argv[2]))["results"][0]["lap_time_s"]
other = json.load(open(sys.argv[3]))["results"][0]["lap_time_s"]
ok = True
# Exact: the same code on the same inputs; the printed text must read back to the same double.
if example != run:
    print(f"FAIL: the example's lap time {printed} is not lapwing run's {run!r}")
    ok = False
if other == run:
    print(f"FAIL: the other model gives the same lap time ({other!r}): the check proves nothing")
    ok = False
print(f"install: example {printed} s, lapwing run {run!r} s ({lines[0]}); the other model {other!r} s")
sys.exit(0 if ok else 1)
PY
exit $fail
