# FindCLP: COIN-OR's LP engine CLP as Debian's coinor-libclp-dev ships it
# (a pkg-config file clp.pc, no CMake package of its own).
#
# Defines CLP_FOUND and the imported target CLP::CLP.
find_package(PkgConfig QUIET)
if(PkgConfig_FOUND)
  pkg_check_modules(PC_CLP QUIET clp)
endif()
find_path(CLP_INCLUDE_DIR NAMES ClpSimplex.hpp HINTS ${PC_CLP_INCLUDE_DIRS} PATH_SUFFIXES coin coinor)
find_library(CLP_LIBRARY NAMES Clp HINTS ${PC_CLP_LIBRARY_DIRS})
find_library(CLP_COINUTILS_LIBRARY NAMES CoinUtils HINTS ${PC_CLP_LIBRARY_DIRS})

include(FindPackageHandleStandardArgs)
find_package_handle_standard_args(CLP REQUIRED_VARS CLP_LIBRARY CLP_COINUTILS_LIBRARY CLP_INCLUDE_DIR)

if(CLP_FOUND AND NOT TARGET CLP::CLP)
  add_library(CLP::CLP INTERFACE IMPORTED)
  # pkg-config knows the libraries CLP itself links (BLAS, LAPACK, zlib ...)
  # where static linking needs them; the shared libraries bring their own.
  set(_clp_libraries "${CLP_LIBRARY}" "${CLP_COINUTILS_LIBRARY}")
  set_target_properties(CLP::CLP PROPERTIES
    INTERFACE_LINK_LIBRARIES "${_clp_libraries}"
    INTERFACE_INCLUDE_DIRECTORIES "${CLP_INCLUDE_DIR}")
  unset(_clp_libraries)
endif()
mark_as_advanced(CLP_INCLUDE_DIR CLP_LIBRARY CLP_COINUTILS_LIBRARY)
