# cmake/FindLibYAML.cmake — locate libyaml (the C YAML parser) and define LibYAML::LibYAML.
# Debian's libyaml-dev ships a pkg-config file but no CMake config; a plain search needs no pkg-config.
find_path(LibYAML_INCLUDE_DIR yaml.h)
find_library(LibYAML_LIBRARY yaml)

include(FindPackageHandleStandardArgs)
find_package_handle_standard_args(LibYAML REQUIRED_VARS LibYAML_INCLUDE_DIR LibYAML_LIBRARY)

if(LibYAML_FOUND AND NOT TARGET LibYAML::LibYAML)
  add_library(LibYAML::LibYAML UNKNOWN IMPORTED)
  set_target_properties(LibYAML::LibYAML PROPERTIES
    IMPORTED_LOCATION "${LibYAML_LIBRARY}"
    INTERFACE_INCLUDE_DIRECTORIES "${LibYAML_INCLUDE_DIR}")
endif()
