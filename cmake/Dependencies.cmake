# Every dependency comes from Debian 12 packages; nothing is downloaded.
find_package(PkgConfig REQUIRED)
pkg_check_modules(LIBAV REQUIRED IMPORTED_TARGET
  libavformat libavcodec libavutil libswscale libswresample)
# Only the OpenCV modules the library calls: each module's shared libraries
# are loaded at every start of the CLI. Pictures are written with libjpeg and
# libpng (analyzer/encode/picture_encoding.h), not OpenCV's image codecs,
# whose dependencies (GDAL, HDF5, poppler, ...) are most of that cost.
find_package(OpenCV 4 REQUIRED COMPONENTS core imgproc video calib3d)
set(CLIPWARDEN_OPENCV_LIBS opencv_core opencv_imgproc opencv_video opencv_calib3d)
find_package(JPEG REQUIRED)
find_package(PNG REQUIRED)
find_package(nlohmann_json 3 REQUIRED)
find_package(Eigen3 REQUIRED NO_MODULE)
find_package(SQLite3 REQUIRED)
find_package(Threads REQUIRED)
# Animated WebP: FFmpeg 5.1 cannot decode it; libwebp's animation decoder
# (libwebpdemux, Debian package libwebp-dev) does.
pkg_check_modules(WEBP REQUIRED IMPORTED_TARGET libwebpdemux libwebp)
# The review station's HTTP server (Debian libcpp-httplib-dev, a compiled
# library whose header must see the same feature macros: taken from its .pc).
pkg_check_modules(HTTPLIB REQUIRED IMPORTED_TARGET cpp-httplib)
