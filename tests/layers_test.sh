#!/usr/bin/env bash
# The layers keep one direction (DEVELOPERS.md, architecture): every #include "lapwing/<layer>/..."
# in include/lapwing/<layer>/ and src/<layer>/ names a layer the including one may use, and the
# third-party libraries stay in the layers that own them. A layer that reaches up fails here.
#   layers_test.sh SOURCE_DIR
set -u
cd "$1" || exit 1
declare -A may=(
  [base]="base"
  [model]="base model"
  [path]="base model path"
  [io]="base model path io"
  [solve]="base model path solve"
  [study]="base model path solve study"
  [store]="base model path io solve study store"
  [report]="base model path io solve study report"
  [cli]="base model path io solve study store report"
)
# Third-party headers (by the start of their include) and the only layers that may include them.
declare -A owner=([yaml-cpp]="io" [boost]="solve study" [CLI]="cli" [sqlite3.h]="store"
  [ceres]="study")
fail=0
checked=0
for layer in "${!may[@]}"; do
  for f in include/lapwing/$layer/*.hpp src/$layer/*.cpp src/$layer/*.hpp; do
    [ -e "$f" ] || continue
    checked=$((checked + 1))
    while IFS= read -r inc; do
      used=""  # the layer an include names (a bash match: no process per line)
      if [[ "$inc" =~ ^#include\ \"lapwing/([a-z]*)/ ]]; then used=${BASH_REMATCH[1]}; fi
      if [ -n "$used" ] && [[ " ${may[$layer]} " != *" $used "* ]]; then
        echo "FAIL: $f ($layer) includes $used: $inc"
        fail=1
      fi
      if [[ "$inc" =~ ^#include\ \"lapwing/[a-z_]+\.hpp\" ]]; then
        echo "FAIL: $f includes a header outside the layer folders: $inc"
        fail=1
      fi
      for lib in "${!owner[@]}"; do
        if [[ "$inc" == "#include <$lib"* ]] && [[ " ${owner[$lib]} " != *" $layer "* ]]; then
          echo "FAIL: $f ($layer) includes $lib, which only ${owner[$lib]} may: $inc"
          fail=1
        fi
      done
    done < <(grep -h '^#include' "$f")
  done
done
# Only io (which reads files) and the command line know file positions: the other layers name a
# bad value by its key path (InvalidInput), never by a Mark or an InputError.
for layer in model path solve study report; do
  if grep -nE '\b(InputError|Mark)\b' include/lapwing/$layer/*.hpp src/$layer/*.cpp; then
    echo "FAIL: $layer knows file positions (above)"
    fail=1
  fi
done
# Every source file of the library sits in a layer folder; the one header beside them is the
# umbrella, lapwing/lapwing.hpp, for programs that use the library.
for f in src/*.cpp include/lapwing/*.hpp; do
  [ -e "$f" ] && [ "$f" != include/lapwing/lapwing.hpp ] &&
    { echo "FAIL: $f is outside the layer folders"; fail=1; }
done
# The umbrella includes every public header, each once, and nothing else; the library itself never
# includes it (a layer would then include every layer).
umbrella=include/lapwing/lapwing.hpp
if [ ! -e "$umbrella" ]; then
  echo "FAIL: $umbrella is missing"
  fail=1
else
  listed=$(sed -n 's/^#include "\(lapwing\/[a-z]*\/[a-z_]*\.hpp\)"$/\1/p' "$umbrella" | sort)
  present=$(cd include && ls lapwing/*/*.hpp | sort)
  if [ "$listed" != "$present" ]; then
    echo "FAIL: $umbrella does not include exactly the public headers:"
    diff <(echo "$listed") <(echo "$present") | sed -n 's/^</  included, no such header or twice:/p; s/^>/  not included:/p'
    fail=1
  fi
  if [ "$(grep -c '^#include' "$umbrella")" != "$(echo "$present" | wc -l)" ]; then
    echo "FAIL: $umbrella includes something besides the public headers, or one twice"
    fail=1
  fi
fi
if grep -rn '#include "lapwing/lapwing.hpp"' src include/lapwing/*/; then
  echo "FAIL: the library includes the umbrella header (above)"
  fail=1
fi
# Boost and yaml-cpp are PRIVATE to the libraries that use them (src/CMakeLists.txt), so that the
# installed package asks its users for neither's headers: no public header may include them.
if grep -rnE '^#include <(boost/|yaml-cpp/|sqlite3|ceres/)' include; then
  echo "FAIL: a public header includes Boost, yaml-cpp, SQLite or Ceres (above); they are private to the library"
  fail=1
fi
# The Python module (python/) is a program over the library's public API: it includes the
# umbrella header and no single layer, and pybind11 and Python's headers appear nowhere else.
for f in python/*.cpp; do
  [ -e "$f" ] || continue
  checked=$((checked + 1))
  if grep -nE '^#include "lapwing/' "$f" | grep -v '"lapwing/lapwing.hpp"'; then
    echo "FAIL: $f includes a layer's header; the module uses the umbrella lapwing/lapwing.hpp"
    fail=1
  fi
done
if grep -rnE '^#include [<"](pybind11/|Python\.h)' src include tests examples tools; then
  echo "FAIL: pybind11 or Python's headers outside python/ (above)"
  fail=1
fi
[ "$checked" -gt 40 ] || { echo "FAIL: only $checked files checked"; fail=1; }
echo "layers: $checked files checked"
exit $fail
