// The report's trace script (src/report/traces.js), embedded at build time.
#pragma once

namespace lapwing {
extern const char* const traces_js;
}  // namespace lapwing
