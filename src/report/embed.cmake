# Writes the report's trace script (IN) into a C++ source (OUT) as a raw string, at build time:
# report.html carries it inline and fetches nothing.
file(READ "${IN}" content)
string(FIND "${content}" ")lapwing_js\"" clash)
if(NOT clash EQUAL -1)
  message(FATAL_ERROR "${IN} holds the raw string's delimiter")
endif()
file(WRITE "${OUT}.tmp" "// Generated from src/report/traces.js by src/report/embed.cmake: do not edit.\n#include \"traces_js.hpp\"\n\nnamespace lapwing {\nconst char* const traces_js = R\"lapwing_js(${content})lapwing_js\";\n}  // namespace lapwing\n")
file(COPY_FILE "${OUT}.tmp" "${OUT}" ONLY_IF_DIFFERENT)
file(REMOVE "${OUT}.tmp")
