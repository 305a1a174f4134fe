include(GNUInstallDirs)
include(CMakePackageConfigHelpers)
install(TARGETS clipwarden ${CLIPWARDEN_LAYER_TARGETS} clipwarden_cli EXPORT clipwardenTargets
  ARCHIVE DESTINATION ${CMAKE_INSTALL_LIBDIR}
  LIBRARY DESTINATION ${CMAKE_INSTALL_LIBDIR}
  RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
# The CLI's commands module, where the launcher looks for it
# (analyzer/cli/main.cpp).
install(TARGETS clipwarden_commands_module LIBRARY DESTINATION ${CMAKE_INSTALL_LIBDIR}/clipwarden)
install(DIRECTORY ${PROJECT_SOURCE_DIR}/include/clipwarden DESTINATION ${CMAKE_INSTALL_INCLUDEDIR})
install(EXPORT clipwardenTargets NAMESPACE clipwarden:: DESTINATION ${CMAKE_INSTALL_LIBDIR}/cmake/clipwarden)
configure_package_config_file(${PROJECT_SOURCE_DIR}/cmake/clipwardenConfig.cmake.in
  ${PROJECT_BINARY_DIR}/clipwardenConfig.cmake INSTALL_DESTINATION ${CMAKE_INSTALL_LIBDIR}/cmake/clipwarden)
write_basic_package_version_file(${PROJECT_BINARY_DIR}/clipwardenConfigVersion.cmake COMPATIBILITY SameMinorVersion)
install(FILES ${PROJECT_BINARY_DIR}/clipwardenConfig.cmake ${PROJECT_BINARY_DIR}/clipwardenConfigVersion.cmake
  DESTINATION ${CMAKE_INSTALL_LIBDIR}/cmake/clipwarden)
