// Text from outside (file contents, file names, names in files) made safe for what lapwing
// writes: UTF-8 checked with its position, messages kept to one printable line, and output
// that must be UTF-8 (JSON, YAML) kept so. UTF-8 as RFC 3629 defines it: no overlong forms, no
// surrogates (U+D800..U+DFFF), nothing above U+10FFFF.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace lapwing {

/// The byte offset of the first byte of `text` that does not begin a valid UTF-8 sequence (or
/// that begins one cut short), or nothing when all of it is valid.
std::optional<std::size_t> invalid_utf8_at(std::string_view text);

/// Where a byte offset of `text` stands: 1-based line and column (the column in bytes, as the
/// YAML and CSV readers count), lines ended by '\n'.
struct TextPosition {
  int line = 1, col = 1;
};
TextPosition position_of(std::string_view text, std::size_t offset);

/// "the text is not valid UTF-8 (byte 0xNN)": the sentence an input error gives for the byte at
/// `offset`.
std::string invalid_utf8_message(std::string_view text, std::size_t offset);
/// The error for a text whose lines end with a CR alone (old Mac line ends), which a reader
/// would take as one line: said by the YAML and the CSV readers at the first such CR.
inline constexpr const char* lone_cr_message =
    "the lines end with a CR alone (old Mac line ends): save the file with LF or CR LF line ends";

/// `text` on one printable line: control characters escaped (\n, \r, \t, other C0 and DEL as
/// \xNN, C1 controls and the line and paragraph separators U+2028, U+2029 as \uNNNN) and bytes
/// that are not valid UTF-8 as \xNN. Printable UTF-8 passes unchanged, so applying it twice
/// gives what applying it once gives.
std::string printable(std::string_view text);

/// `text` as valid UTF-8: each byte that is not part of a valid sequence replaced by U+FFFD
/// (the replacement character, Unicode ch. 3.9), the rest unchanged.
std::string valid_utf8(std::string_view text);

/// A word of a command line as a POSIX shell reads it back (Shell Command Language, 2.2.3: inside
/// single quotes every character stands for itself): unchanged when it is not empty and holds
/// only letters, digits and _@%+=:,./-, else in single quotes, a quote in it written '\''.
std::string shell_word(std::string_view word);
/// The words of a command line made of shell_word's words and spaces: split at spaces outside
/// quotes, a single-quoted part read as it stands, a backslash outside quotes taking the next
/// character as it is (Shell Command Language, 2.2.1 and 2.2.3). Double quotes are not read.
std::vector<std::string> shell_words(std::string_view command);

}  // namespace lapwing
