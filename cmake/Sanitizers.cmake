# Warnings on, and sanitizer flags applied to every target when asked.
function(clipwarden_warnings target)
  target_compile_options(${target} PRIVATE -Wall -Wextra -Wpedantic -Wno-missing-field-initializers)
endfunction()

# CLIPWARDEN_FUZZ: one clang build serves the unit tests, the e2e tests and
# the libFuzzer targets (tests/fuzz). All code gets ASan + UBSan and the
# fuzzer's coverage hooks (-fsanitize=fuzzer-no-link); only the fuzz
# executables link libFuzzer itself (-fsanitize=fuzzer, in tests/fuzz). The
# other programs link because the sanitizer runtime defines the coverage
# callbacks weakly.
if(CLIPWARDEN_FUZZ)
  if(NOT CMAKE_CXX_COMPILER_ID MATCHES "Clang")
    message(FATAL_ERROR "CLIPWARDEN_FUZZ needs clang (libFuzzer): configure with "
                        "-DCMAKE_CXX_COMPILER=clang++ (Debian: clang, libclang-rt-14-dev)")
  endif()
  if(CLIPWARDEN_TSAN)
    message(FATAL_ERROR "CLIPWARDEN_FUZZ and CLIPWARDEN_TSAN cannot be combined")
  endif()
  set(CLIPWARDEN_SANITIZE ON)
  add_compile_options(-fsanitize=fuzzer-no-link)
endif()

if(CLIPWARDEN_SANITIZE)
  add_compile_options(-fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined)
  add_link_options(-fsanitize=address,undefined)
endif()
if(CLIPWARDEN_TSAN)
  add_compile_options(-fsanitize=thread -fno-omit-frame-pointer)
  add_link_options(-fsanitize=thread)
  # The suppressions are built into the library, and every program linked
  # against it pulls them in (the runtime asks for
  # __tsan_default_suppressions at start-up), so a TSan binary run by hand
  # reports only what CI would.
  file(READ ${PROJECT_SOURCE_DIR}/.ci/tsan.supp CLIPWARDEN_TSAN_SUPPRESSIONS)
  set_property(DIRECTORY APPEND PROPERTY CMAKE_CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/.ci/tsan.supp)
  configure_file(${CMAKE_CURRENT_LIST_DIR}/tsan_default_suppressions.cpp.in
                 ${PROJECT_BINARY_DIR}/generated/tsan_default_suppressions.cpp @ONLY)
  set(CLIPWARDEN_SANITIZER_SOURCES ${PROJECT_BINARY_DIR}/generated/tsan_default_suppressions.cpp)
  add_link_options(-Wl,--undefined=clipwarden_tsan_suppressions_anchor)
endif()
