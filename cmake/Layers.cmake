# The library is built as one static library per layer, bottom to top. A
# layer lists the folders it owns and the layers it may use; the build links
# it to exactly those, and before compiling it checks that its files include
# no internal header (analyzer/..., report/...) of a layer it may not use,
# so a wrong-way include fails the build with a message naming the file.
# The public headers (include/clipwarden/) are the library's API and every
# layer may include them. DEVELOPERS.md ("Layers") explains the order.
set(CLIPWARDEN_LAYER_TARGETS "")

function(clipwarden_layer name)
  cmake_parse_arguments(L "" "" "FOLDERS;USES;SOURCES" ${ARGN})
  set(sources "")
  set(allowed ${L_FOLDERS})
  foreach(folder IN LISTS L_FOLDERS)
    file(GLOB folder_sources CONFIGURE_DEPENDS ${PROJECT_SOURCE_DIR}/${folder}/*.cpp)
    list(APPEND sources ${folder_sources})
  endforeach()
  foreach(used IN LISTS L_USES)
    get_property(used_folders GLOBAL PROPERTY CLIPWARDEN_LAYER_${used}_FOLDERS)
    list(APPEND allowed ${used_folders})
  endforeach()
  set_property(GLOBAL PROPERTY CLIPWARDEN_LAYER_${name}_FOLDERS ${L_FOLDERS})

  set(target clipwarden_${name})
  add_library(${target} STATIC ${sources} ${L_SOURCES})
  target_include_directories(${target}
    PUBLIC $<BUILD_INTERFACE:${PROJECT_SOURCE_DIR}/include> $<INSTALL_INTERFACE:include>
    PRIVATE ${PROJECT_SOURCE_DIR} ${PROJECT_BINARY_DIR}/generated)
  target_include_directories(${target} SYSTEM PUBLIC ${OpenCV_INCLUDE_DIRS})
  target_link_libraries(${target} PUBLIC ${CLIPWARDEN_OPENCV_LIBS} nlohmann_json::nlohmann_json)
  foreach(used IN LISTS L_USES)
    target_link_libraries(${target} PUBLIC clipwarden_${used})
  endforeach()
  clipwarden_warnings(${target})

  string(REPLACE ";" "," folders_arg "${L_FOLDERS}")
  string(REPLACE ";" "," allowed_arg "${allowed}")
  add_custom_target(${target}_include_check
    COMMAND ${CMAKE_COMMAND} -DLAYER=${name} -DROOT=${PROJECT_SOURCE_DIR}
            -DFOLDERS=${folders_arg} -DALLOWED=${allowed_arg}
            -P ${PROJECT_SOURCE_DIR}/cmake/check_layer_includes.cmake
    COMMENT "" VERBATIM)
  add_dependencies(${target} ${target}_include_check)
  set(CLIPWARDEN_LAYER_TARGETS ${CLIPWARDEN_LAYER_TARGETS} ${target} PARENT_SCOPE)
endfunction()
