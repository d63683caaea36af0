# FindGLPK: the GNU Linear Programming Kit as Debian's libglpk-dev ships it
# (glpk.h and libglpk, no CMake package or pkg-config file).
#
# Defines GLPK_FOUND and the imported target GLPK::GLPK.
find_path(GLPK_INCLUDE_DIR NAMES glpk.h)
find_library(GLPK_LIBRARY NAMES glpk)

include(FindPackageHandleStandardArgs)
find_package_handle_standard_args(GLPK REQUIRED_VARS GLPK_LIBRARY GLPK_INCLUDE_DIR)

if(GLPK_FOUND AND NOT TARGET GLPK::GLPK)
  add_library(GLPK::GLPK UNKNOWN IMPORTED)
  set_target_properties(GLPK::GLPK PROPERTIES
    IMPORTED_LOCATION "${GLPK_LIBRARY}"
    INTERFACE_INCLUDE_DIRECTORIES "${GLPK_INCLUDE_DIR}")
endif()
mark_as_advanced(GLPK_INCLUDE_DIR GLPK_LIBRARY)
