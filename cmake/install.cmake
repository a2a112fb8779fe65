# The installed package: `cmake --install BUILD --prefix PREFIX` puts
#   PREFIX/include/lapwing/...                     the public headers (every layer, lapwing.hpp)
#   PREFIX/lib/liblapwing_<layer>.a                the static libraries, one per layer
#   PREFIX/lib/cmake/lapwing/lapwingConfig.cmake   with its version file and the exported targets
#   PREFIX/bin/lapwing                             the command line, when it is built
# A consumer writes find_package(lapwing CONFIG REQUIRED) and links lapwing::core (or one layer,
# lapwing::<layer>); examples/library/ is such a project, and tests/install_test.sh builds it
# against a fresh install.
include(CMakePackageConfigHelpers)

set(LAPWING_CMAKE_DIR ${CMAKE_INSTALL_LIBDIR}/cmake/lapwing)

install(DIRECTORY ${PROJECT_SOURCE_DIR}/include/lapwing
        DESTINATION ${CMAKE_INSTALL_INCLUDEDIR}
        FILES_MATCHING PATTERN "*.hpp")

install(TARGETS ${LAPWING_LAYERS} lapwing_core
        EXPORT lapwingTargets
        ARCHIVE DESTINATION ${CMAKE_INSTALL_LIBDIR})  # the include dir: lapwing::base's

install(EXPORT lapwingTargets
        NAMESPACE lapwing::
        DESTINATION ${LAPWING_CMAKE_DIR})

configure_package_config_file(
  ${CMAKE_CURRENT_LIST_DIR}/lapwingConfig.cmake.in
  ${PROJECT_BINARY_DIR}/lapwingConfig.cmake
  INSTALL_DESTINATION ${LAPWING_CMAKE_DIR})
# 0.x: a minor version may change the interface, so only the same major.minor is compatible.
write_basic_package_version_file(
  ${PROJECT_BINARY_DIR}/lapwingConfigVersion.cmake
  COMPATIBILITY SameMinorVersion)
install(FILES ${PROJECT_BINARY_DIR}/lapwingConfig.cmake
              ${PROJECT_BINARY_DIR}/lapwingConfigVersion.cmake
        DESTINATION ${LAPWING_CMAKE_DIR})

if(LAPWING_BUILD_CLI)
  install(TARGETS lapwing RUNTIME DESTINATION ${CMAKE_INSTALL_BINDIR})
  # `lapwing fit` looks for its module in <prefix>/<libdir>/lapwing (src/cli/fit_loader.cpp).
  install(TARGETS lapwing_fit LIBRARY DESTINATION ${CMAKE_INSTALL_LIBDIR}/lapwing)
endif()
