include(GNUInstallDirs)
include(CMakePackageConfigHelpers)
install(TARGETS framelint framelint_cli EXPORT framelintTargets
  ARCHIVE DESTINATION ${CMAKE_INSTALL_LIBDIR}
  LIBRARY DESTINATION ${CMAKE_INSTALL_LIBDIR}
  RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
install(DIRECTORY ${PROJECT_SOURCE_DIR}/include/framelint DESTINATION ${CMAKE_INSTALL_INCLUDEDIR})
install(EXPORT framelintTargets NAMESPACE framelint:: DESTINATION ${CMAKE_INSTALL_LIBDIR}/cmake/framelint)
configure_package_config_file(${PROJECT_SOURCE_DIR}/cmake/framelintConfig.cmake.in
  ${PROJECT_BINARY_DIR}/framelintConfig.cmake INSTALL_DESTINATION ${CMAKE_INSTALL_LIBDIR}/cmake/framelint)
write_basic_package_version_file(${PROJECT_BINARY_DIR}/framelintConfigVersion.cmake COMPATIBILITY SameMinorVersion)
install(FILES ${PROJECT_BINARY_DIR}/framelintConfig.cmake ${PROJECT_BINARY_DIR}/framelintConfigVersion.cmake
  DESTINATION ${CMAKE_INSTALL_LIBDIR}/cmake/framelint)
