# cmake/FindKLU.cmake — locate SuiteSparse KLU and define SuiteSparse::KLU.
# SuiteSparse 7 ships a CMake config; Debian 12's SuiteSparse 5 ships none, so fall back to a search.
find_package(KLU CONFIG QUIET)
if(TARGET SuiteSparse::KLU)
  set(KLU_FOUND TRUE)
  return()
endif()

find_path(KLU_INCLUDE_DIR klu.h PATH_SUFFIXES suitesparse)
foreach(lib klu amd colamd btf suitesparseconfig)
  find_library(KLU_${lib}_LIBRARY ${lib})
  list(APPEND KLU_LIBRARIES ${KLU_${lib}_LIBRARY})
endforeach()

include(FindPackageHandleStandardArgs)
find_package_handle_standard_args(KLU REQUIRED_VARS KLU_INCLUDE_DIR KLU_klu_LIBRARY
  KLU_amd_LIBRARY KLU_colamd_LIBRARY KLU_btf_LIBRARY KLU_suitesparseconfig_LIBRARY)

if(KLU_FOUND AND NOT TARGET SuiteSparse::KLU)
  add_library(SuiteSparse::KLU INTERFACE IMPORTED)
  set_target_properties(SuiteSparse::KLU PROPERTIES
    INTERFACE_INCLUDE_DIRECTORIES "${KLU_INCLUDE_DIR}"
    INTERFACE_LINK_LIBRARIES "${KLU_LIBRARIES}")
endif()
