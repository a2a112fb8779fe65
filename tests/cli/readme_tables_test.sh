#!/usr/bin/env bash
# The lap tables of README.md are the build's (they went stale once): the rows that
# tools/line-table and tools/survey-table print from the binary begin rows of README.md
# (README, "The racing line": the lap columns; README, "Tracks from data": the survey's table), and the
# gap README.md states between a line and the track `track line` writes from it (at most 0.039 %
# on the bundled circuits) holds for every pair tools/line-gap measures. The figures are the
# program's own output at the 3 decimals README.md prints: equal text, no tolerance.
#   readme_tables_test.sh LAPWING_BINARY SOURCE_DIR
set -u
bin=$(realpath "$1")
cd "$2" || exit 1
pass=0
fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL: $*"; }

check_rows() {  # tool; every row it prints begins a line of README.md
  local rows
  rows=$("tools/$1" "$bin") || { bad "tools/$1 failed"; return; }
  [ -n "$rows" ] || { bad "tools/$1 printed nothing"; return; }
  while IFS= read -r row; do
    ROW=$row awk 'index($0, ENVIRON["ROW"]) == 1 { found = 1 } END { exit !found }' README.md &&
      ok || bad "README.md lacks the row (tools/$1): $row"
  done <<< "$rows"
}
check_rows line-table
check_rows survey-table

gaps=$(tools/line-gap "$bin") || bad "tools/line-gap failed"
grep -q "0.013 to 0.039 %" README.md && ok || bad "README.md no longer states the line's gap as 0.013 to 0.039 %"
echo "$gaps" | awk -F, 'NR > 1 { n++; g = $5 < 0 ? -$5 : $5; if (g > 0.039) { print "FAIL: gap " $0; bad++ } }
  END { exit !(n == 8 && bad == 0) }' && ok || bad "a written line laps beyond the 0.039 % of README.md: $gaps"

echo "readme tables: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
