#include "analyzer/encode/picture_encoding.h"

#include <algorithm>
#include <csetjmp>
#include <cstdio>
#include <cstdlib>

// jpeglib.h needs size_t and FILE declared before it.
#include <jpeglib.h>
#include <png.h>
#include <zlib.h>

namespace clipwarden {
namespace {

// Both libraries report errors through a callback that must not return; it
// jumps back to the setjmp in the compressing function. Those functions keep
// only plain C objects between setjmp and longjmp (no destructors skipped),
// and nothing is printed: the caller turns failure into its own error.
struct JpegErrors {
  jpeg_error_mgr manager;
  std::jmp_buf jump;
};

[[noreturn]] void jpeg_fail(j_common_ptr cinfo) {
  std::longjmp(reinterpret_cast<JpegErrors*>(cinfo->err)->jump, 1);
}
void jpeg_quiet(j_common_ptr) {}

// Grey, BGR and BGRA rows are read by libjpeg-turbo as they are, so no
// converted copy is made (alpha is ignored).
bool jpeg_can_read(const cv::Mat& image) {
  return image.type() == CV_8UC1 || image.type() == CV_8UC3 || image.type() == CV_8UC4;
}
void describe_jpeg_input(const cv::Mat& image, jpeg_compress_struct& cinfo) {
  cinfo.image_width = static_cast<JDIMENSION>(image.cols);
  cinfo.image_height = static_cast<JDIMENSION>(image.rows);
  cinfo.input_components = image.channels();
  cinfo.in_color_space = image.channels() == 1   ? JCS_GRAYSCALE
                         : image.channels() == 3 ? JCS_EXT_BGR
                                                 : JCS_EXT_BGRX;
}

// Fills `out`/`size` (malloc'ed by libjpeg's memory destination); false on
// any libjpeg error. No local variable changes between setjmp and a
// longjmp back to it (everything lives in cinfo).
bool compress_jpeg(const cv::Mat& image, int quality, unsigned char** out, unsigned long* size) {
  if (!jpeg_can_read(image)) return false;
  jpeg_compress_struct cinfo{};
  JpegErrors errors{};
  cinfo.err = jpeg_std_error(&errors.manager);
  errors.manager.error_exit = jpeg_fail;
  errors.manager.output_message = jpeg_quiet;
  if (setjmp(errors.jump)) {
    jpeg_destroy_compress(&cinfo);
    return false;
  }
  jpeg_create_compress(&cinfo);
  jpeg_mem_dest(&cinfo, out, size);
  describe_jpeg_input(image, cinfo);
  jpeg_set_defaults(&cinfo);
  jpeg_set_quality(&cinfo, std::clamp(quality, 1, 100), TRUE /* baseline tables */);
  jpeg_start_compress(&cinfo, TRUE);
  while (cinfo.next_scanline < cinfo.image_height) {
    JSAMPROW row = const_cast<JSAMPROW>(image.ptr<JSAMPLE>(static_cast<int>(cinfo.next_scanline)));
    jpeg_write_scanlines(&cinfo, &row, 1);
  }
  jpeg_finish_compress(&cinfo);
  jpeg_destroy_compress(&cinfo);
  return true;
}

[[noreturn]] void png_fail(png_structp png, png_const_charp) { png_longjmp(png, 1); }
void png_quiet(png_structp, png_const_charp) {}

void png_append(png_structp png, png_bytep data, png_size_t length) {
  auto* bytes = static_cast<std::string*>(png_get_io_ptr(png));
  try {
    bytes->append(reinterpret_cast<const char*>(data), length);
  } catch (...) {  // must not unwind through libpng's C frames
    png_error(png, "out of memory");
  }
}
void png_no_flush(png_structp) {}

int png_colour_type(const cv::Mat& image) {
  switch (image.type()) {
    case CV_8UC1:
      return PNG_COLOR_TYPE_GRAY;
    case CV_8UC3:
      return PNG_COLOR_TYPE_RGB;
    case CV_8UC4:
      return PNG_COLOR_TYPE_RGB_ALPHA;
    default:
      return -1;
  }
}

bool compress_png(const cv::Mat& image, std::string* out) {
  const int colour_type = png_colour_type(image);
  if (colour_type < 0) return false;
  png_structp png = png_create_write_struct(PNG_LIBPNG_VER_STRING, nullptr, png_fail, png_quiet);
  if (!png) return false;
  png_infop info = png_create_info_struct(png);
  if (!info || setjmp(png_jmpbuf(png))) {
    png_destroy_write_struct(&png, &info);
    return false;
  }
  png_set_write_fn(png, out, png_append, png_no_flush);
  png_set_filter(png, PNG_FILTER_TYPE_BASE, PNG_FILTER_SUB);
  png_set_compression_level(png, Z_BEST_SPEED);
  png_set_compression_strategy(png, Z_RLE);
  png_set_IHDR(png, info, static_cast<png_uint_32>(image.cols),
               static_cast<png_uint_32>(image.rows), 8, colour_type, PNG_INTERLACE_NONE,
               PNG_COMPRESSION_TYPE_DEFAULT, PNG_FILTER_TYPE_DEFAULT);
  png_write_info(png, info);
  if (image.channels() >= 3) png_set_bgr(png);  // OpenCV keeps blue first
  for (int y = 0; y < image.rows; ++y) png_write_row(png, image.ptr<png_byte>(y));
  png_write_end(png, info);
  png_destroy_write_struct(&png, &info);
  return true;
}

}  // namespace

std::optional<std::string> jpeg_file_bytes(const cv::Mat& image, int quality) {
  if (image.empty()) return std::nullopt;
  unsigned char* buffer = nullptr;
  unsigned long size = 0;
  const bool ok = compress_jpeg(image, quality, &buffer, &size);
  std::optional<std::string> bytes;
  if (ok && buffer) bytes.emplace(reinterpret_cast<const char*>(buffer), size);
  std::free(buffer);
  return bytes;
}

std::optional<std::string> png_file_bytes(const cv::Mat& image) {
  if (image.empty()) return std::nullopt;
  std::string bytes;
  if (!compress_png(image, &bytes)) return std::nullopt;
  return bytes;
}

}  // namespace clipwarden
