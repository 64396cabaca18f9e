# A Debian package from the install rules (cmake/install.cmake, cmake/docs.cmake), built in the build
# folder with `cpack -G DEB` (scripts/setup.sh does; see DEVELOPERS.md). One package holds the program,
# its man pages and bash completion, and the library with its headers and CMake package configuration.
set(CPACK_PACKAGE_NAME rtline)
set(CPACK_PACKAGE_VENDOR "rtline contributors")
set(CPACK_PACKAGE_CONTACT "rtline contributors <rtline@localhost>")
set(CPACK_PACKAGE_DESCRIPTION_SUMMARY "design NTC thermistor linearization circuits")
set(CPACK_PACKAGE_DESCRIPTION
    "rtline evaluates and fits NTC thermistor models, analyses divider, shunt and bridge networks against a
straight line, sizes their resistors with IEC 60063 standard values, budgets the error with real parts
and writes ADC-code-to-temperature tables for firmware. The package also holds the core library
(rtline::core for CMake's find_package) and its headers. rtline designs measurement circuits; it is not a
protective device.")
set(CPACK_RESOURCE_FILE_LICENSE ${PROJECT_SOURCE_DIR}/LICENSE)
set(CPACK_GENERATOR DEB)
set(CPACK_PACKAGING_INSTALL_PREFIX /usr)
set(CPACK_DEBIAN_FILE_NAME DEB-DEFAULT)  # rtline_VERSION-RELEASE_ARCH.deb
set(CPACK_DEBIAN_PACKAGE_RELEASE 1)
set(CPACK_DEBIAN_PACKAGE_SECTION science)
set(CPACK_DEBIAN_PACKAGE_PRIORITY optional)
# The run-time libraries the program links, found by dpkg-shlibdeps (Debian: dpkg-dev).
set(CPACK_DEBIAN_PACKAGE_SHLIBDEPS ON)
set(CPACK_STRIP_FILES ON)
include(CPack)
