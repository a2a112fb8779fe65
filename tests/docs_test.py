"""The documentation is true to the code and its citations resolve.

  docs_test.py SOURCE_DIR

- No comment cites "SPEC" (a contract that is not in the repository); the README is cited as
  README, "Heading"  and the heading exists (its first words), so that a reader finds the place;
  so too the record of the speed work, cited as  docs/performance.md, "Heading".
- Every key the car and track loaders read (src/io/car_file.cpp, track_file.cpp), each of a key's
  choices, and every unit spelling they accept (src/base/units.cpp) is named in README's
  "Input formats"; every option of the command line (src/cli/main.cpp), every JSON key written
  (src/report, src/cli) and every CSV column (src/report) in its "Commands".
The names are taken from the code by pattern, so a key added without its documentation fails here.
"""
import pathlib
import re
import sys

root = pathlib.Path(sys.argv[1])
readme = (root / "README.md").read_text()
failures = []


def section(title):
    """README's level-2 section whose heading starts with `title`, up to the next level-2 one."""
    m = re.search(r"^## " + re.escape(title) + r".*?$(.*?)(?=^## |\Z)", readme, re.M | re.S)
    if not m:
        failures.append(f'README has no section "## {title}"')
        return ""
    return m.group(1)


def named(word, text):
    """`word` appears in `text` as a whole name (not inside a longer identifier or unit)."""
    return re.search(r"(?<![\w/*-])" + re.escape(word) + r"(?![\w/*-])", text) is not None


code_dirs = ["src", "include", "tests", "tools", "examples", "cmake", "python"]
code_files = [p for d in code_dirs for p in (root / d).rglob("*") if p.is_file()
              and p.suffix in {".cpp", ".hpp", ".h", ".sh", ".py", ".txt", ".cmake", ".in", ""}
              and p.name != "docs_test.py"]

# 1. Citations.
headings = [h.strip() for h in re.findall(r"^#+ (.*)$", readme, re.M)]
# The record of the speed work, cited as  docs/performance.md, "Heading".
perf_doc = (root / "docs/performance.md").read_text()
perf_headings = [h.strip() for h in re.findall(r"^#+ (.*)$", perf_doc, re.M)]
for p in code_files:
    try:
        text = p.read_text()
    except UnicodeDecodeError:
        continue
    # A citation may run over two comment lines: the lines are joined (each next line's comment
    # marker and indent read as one space) and each citation found in the whole, at its line.
    joined, line_at = [], []
    for n, line in enumerate(text.splitlines(), 1):
        part = re.sub(r"^\s*(?:///?|#)\s?", "", line) if joined else line
        joined.append(" " + part if joined else part)
        line_at.extend([n] * len(joined[-1]))
    joined = "".join(joined)
    # README, "Heading" (the quotes escaped inside a C++ string: a test's name).
    for m in re.finditer(r'README, \\?"([^"\\]+)\\?"', joined):
        if not any(h.startswith(m.group(1)) for h in headings):
            failures.append(f'{p.relative_to(root)}:{line_at[m.start()]}: README has no heading '
                            f'"{m.group(1)}"')
    for m in re.finditer(r'docs/performance\.md, \\?"([^"\\]+)\\?"', joined):
        if not any(h.startswith(m.group(1)) for h in perf_headings):
            failures.append(f'{p.relative_to(root)}:{line_at[m.start()]}: docs/performance.md '
                            f'has no heading "{m.group(1)}"')
    for n, line in enumerate(text.splitlines(), 1):
        if re.search(r"\bSPEC\b", line):
            failures.append(f"{p.relative_to(root)}:{n}: cites SPEC, which is not in the repository")
        if re.search(r'README(?!\.md|, \\?")', line):
            failures.append(f'{p.relative_to(root)}:{n}: cite the README as README, "Heading"')

# 2. Keys, choices and units in "Input formats".
formats = section("Input formats")
loaders = "".join((root / "src/io" / f).read_text() for f in ["car_file.cpp", "track_file.cpp"])
keys = set(re.findall(r'\.\w+\("([a-z_]+)"', loaders))
for group in re.findall(r"keys\(\{([^}]*)\}", loaders):
    keys.update(re.findall(r'"([a-z_]+)"', group))
for group in re.findall(r'choice\("[a-z_]+", \{([^}]*)\}', loaders):
    keys.update(re.findall(r'"([a-z_-]+)"', group))
if len(keys) < 60:
    failures.append(f"only {len(keys)} keys found in the loaders: the pattern no longer matches")
for k in sorted(keys):
    if not named(k, formats):
        failures.append(f'key or choice "{k}" (src/io) is not named in README, "Input formats"')

units_src = (root / "src/base/units.cpp").read_text()
spellings = set()
for table in re.findall(r"constexpr Units<\d+> \w+\{(.*?)\};", units_src, re.S):
    spellings.update(re.findall(r'\{"([^"]+)",', table))
if len(spellings) < 30:
    failures.append(f"only {len(spellings)} unit spellings found: the pattern no longer matches")
for u in sorted(spellings):
    if not named(u, formats):
        failures.append(f'unit "{u}" (src/base/units.cpp) is not named in README, "Input formats"')

# 3. Options in "Commands".
commands = section("Commands")
options = set(re.findall(r'add_(?:option|flag)\("(--[a-z-]+)"', (root / "src/cli/main.cpp").read_text()))
if len(options) < 20:
    failures.append(f"only {len(options)} options found in src/cli/main.cpp")
for o in sorted(options):
    if not named(o, commands):
        failures.append(f'option {o} (src/cli/main.cpp) is not named in README, "Commands"')

# 4. Output names in "Commands" (its "Output files"): every JSON key the report layer and the
# command line write, every CSV column the report layer defines.
writers = "".join(p.read_text() for d in ["src/report", "src/cli"] for p in (root / d).glob("*.cpp"))
json_keys = set(re.findall(r'(?:\.field|\.key|optional_field\(w,) ?\(?"([a-z_0-9]+)"', writers))
columns = set(re.findall(r'^\s*\{"([A-Za-z_0-9]+)",', "".join(
    p.read_text() for p in (root / "src/report").glob("*.cpp")), re.M))
if len(json_keys) < 80 or len(columns) < 30:
    failures.append(f"only {len(json_keys)} JSON keys and {len(columns)} CSV columns found")
for k in sorted(json_keys | columns):
    if not named(k, commands):
        failures.append(f'output name "{k}" (src/report, src/cli) is not named in README, "Commands"')

for f in failures:
    print("FAIL:", f)
print(f"docs: {len(code_files)} files' citations, {len(keys)} keys, {len(spellings)} units, "
      f"{len(options)} options, {len(json_keys)} JSON keys, {len(columns)} CSV columns checked")
sys.exit(1 if failures else 0)
