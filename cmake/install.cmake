# Install rules: the program, the core library with its public headers, and a package configuration
# so that another CMake project does find_package(rtline) and links rtline::core. CPack
# (cmake/package.cmake) builds the Debian package from these same rules.
include(GNUInstallDirs)
include(CMakePackageConfigHelpers)

set(RTLINE_CMAKE_DIR ${CMAKE_INSTALL_LIBDIR}/cmake/rtline)

# Installed as librtline_core.a and imported as rtline::core.
set_target_properties(rtline_core PROPERTIES EXPORT_NAME core)

install(TARGETS rtline RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
# Its include folder for users is set on the target (INSTALL_INTERFACE in CMakeLists.txt).
install(TARGETS rtline_core EXPORT rtlineTargets ARCHIVE DESTINATION ${CMAKE_INSTALL_LIBDIR})
install(DIRECTORY ${PROJECT_SOURCE_DIR}/include/rtline DESTINATION ${CMAKE_INSTALL_INCLUDEDIR}
        FILES_MATCHING PATTERN "*.hpp")

install(EXPORT rtlineTargets NAMESPACE rtline:: DESTINATION ${RTLINE_CMAKE_DIR})
configure_package_config_file(${CMAKE_CURRENT_LIST_DIR}/rtlineConfig.cmake.in
                              ${PROJECT_BINARY_DIR}/rtlineConfig.cmake
                              INSTALL_DESTINATION ${RTLINE_CMAKE_DIR})
# Before 1.0 a minor version may change the API, so only the same major.minor is compatible.
write_basic_package_version_file(${PROJECT_BINARY_DIR}/rtlineConfigVersion.cmake
                                 COMPATIBILITY SameMinorVersion)
install(FILES ${PROJECT_BINARY_DIR}/rtlineConfig.cmake ${PROJECT_BINARY_DIR}/rtlineConfigVersion.cmake
        DESTINATION ${RTLINE_CMAKE_DIR})
install(FILES ${PROJECT_SOURCE_DIR}/LICENSE DESTINATION ${CMAKE_INSTALL_DOCDIR})
