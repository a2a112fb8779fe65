// Reads a PNG (8-bit greyscale, RGB or RGBA, not interlaced: what a headless browser's screenshot
// is) and prints its size, the number of distinct colours and the share of the most common one.
// Exits 1 when the picture is blank or one colour (more than 99.5 % of pixels the same).
//   png_stats FILE.png
#include <zlib.h>

#include <cstdint>
#include <cstdio>
#include <fstream>
#include <iterator>
#include <map>
#include <string>
#include <vector>

namespace {
std::uint32_t be32(const unsigned char* p) {
  return (std::uint32_t(p[0]) << 24) | (std::uint32_t(p[1]) << 16) | (std::uint32_t(p[2]) << 8) |
         p[3];
}
int paeth(int a, int b, int c) {
  const int p = a + b - c, pa = std::abs(p - a), pb = std::abs(p - b), pc = std::abs(p - c);
  return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
}
}  // namespace

int main(int argc, char** argv) {
  if (argc != 2) return 2;
  std::ifstream in(argv[1], std::ios::binary);
  const std::vector<unsigned char> f((std::istreambuf_iterator<char>(in)), {});
  const unsigned char sig[8] = {137, 80, 78, 71, 13, 10, 26, 10};
  if (f.size() < 33 || !std::equal(sig, sig + 8, f.begin())) {
    std::fprintf(stderr, "png_stats: not a PNG\n");
    return 2;
  }
  std::uint32_t width = 0, height = 0;
  int depth = 0, type = 0, interlace = 0;
  std::vector<unsigned char> idat;
  for (std::size_t at = 8; at + 12 <= f.size();) {
    const std::uint32_t len = be32(&f[at]);
    const std::string kind(f.begin() + at + 4, f.begin() + at + 8);
    const unsigned char* data = &f[at + 8];
    if (kind == "IHDR") {
      width = be32(data);
      height = be32(data + 4);
      depth = data[8];
      type = data[9];
      interlace = data[12];
    } else if (kind == "IDAT") {
      idat.insert(idat.end(), data, data + len);
    } else if (kind == "IEND") {
      break;
    }
    at += 12 + len;
  }
  const int channels = type == 0 ? 1 : type == 2 ? 3 : type == 6 ? 4 : 0;
  if (depth != 8 || channels == 0 || interlace != 0) {
    std::fprintf(stderr, "png_stats: unsupported PNG (depth %d, type %d, interlace %d)\n", depth,
                 type, interlace);
    return 2;
  }
  const std::size_t row = std::size_t(width) * channels;
  std::vector<unsigned char> raw((row + 1) * height);
  uLongf raw_len = raw.size();
  if (uncompress(raw.data(), &raw_len, idat.data(), idat.size()) != Z_OK || raw_len != raw.size()) {
    std::fprintf(stderr, "png_stats: bad image data\n");
    return 2;
  }
  std::vector<unsigned char> img(row * height), prev(row, 0);
  for (std::uint32_t y = 0; y < height; ++y) {
    const unsigned char* src = &raw[y * (row + 1)];
    unsigned char* dst = &img[y * row];
    const int filter = src[0];
    for (std::size_t x = 0; x < row; ++x) {
      const int a = x >= std::size_t(channels) ? dst[x - channels] : 0, b = prev[x];
      const int c = x >= std::size_t(channels) ? prev[x - channels] : 0;
      int v = src[1 + x];
      switch (filter) {
        case 1:
          v += a;
          break;
        case 2:
          v += b;
          break;
        case 3:
          v += (a + b) / 2;
          break;
        case 4:
          v += paeth(a, b, c);
          break;
        default:
          break;
      }
      dst[x] = static_cast<unsigned char>(v);
    }
    std::copy(dst, dst + row, prev.begin());
  }
  std::map<std::uint32_t, std::size_t> counts;
  for (std::size_t p = 0; p < std::size_t(width) * height; ++p) {
    std::uint32_t key = 0;
    for (int k = 0; k < std::min(channels, 3); ++k) key = (key << 8) | img[p * channels + k];
    ++counts[key];
  }
  std::size_t top = 0;
  for (const auto& [k, n] : counts) top = std::max(top, n);
  const double share = double(top) / (double(width) * height);
  std::printf("%ux%u, %zu colours, most common %.1f %%\n", width, height, counts.size(),
              100 * share);
  return counts.size() > 1 && share < 0.995 ? 0 : 1;
}
