# Turns every file in the given folders into a C++ string constant, looked up
# by file name through clipwarden::asset("name") (analyzer/core/assets.h).
function(clipwarden_embed_assets out_var)
  set(files "")
  foreach(dir ${ARGN})
    file(GLOB found CONFIGURE_DEPENDS ${dir}/*)
    list(APPEND files ${found})
  endforeach()
  list(SORT files)
  set(out ${PROJECT_BINARY_DIR}/generated/clipwarden_assets.cpp)
  # A list would be split into separate arguments of the command; pass it
  # joined with '|' (not a path character we use) and split it in the script.
  string(REPLACE ";" "|" files_arg "${files}")
  add_custom_command(
    OUTPUT ${out}
    COMMAND ${CMAKE_COMMAND} -DOUT=${out} "-DFILES=${files_arg}" -P ${PROJECT_SOURCE_DIR}/cmake/embed_assets.cmake
    DEPENDS ${files} ${PROJECT_SOURCE_DIR}/cmake/embed_assets.cmake
    COMMENT "Embedding report assets"
    VERBATIM)
  set(${out_var} ${out} PARENT_SCOPE)
endfunction()
