# Every dependency comes from Debian 12 packages; nothing is downloaded.
find_package(PkgConfig REQUIRED)
pkg_check_modules(LIBAV REQUIRED IMPORTED_TARGET
  libavformat libavcodec libavutil libswscale libswresample)
find_package(OpenCV 4 REQUIRED COMPONENTS core imgproc video imgcodecs calib3d features2d)
find_package(nlohmann_json 3 REQUIRED)
find_package(Eigen3 REQUIRED NO_MODULE)
find_package(SQLite3 REQUIRED)
find_package(Threads REQUIRED)
# Animated WebP: FFmpeg 5.1 cannot decode it; libwebp's animation decoder
# (libwebpdemux, Debian package libwebp-dev) does.
pkg_check_modules(WEBP REQUIRED IMPORTED_TARGET libwebpdemux libwebp)
