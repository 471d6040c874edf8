# Layered libraries: each folder of sim/ is one static library that links only
# the layers below it. tritsim_layer() also reads every #include "folder/..."
# of the folder's sources at configure time and stops the configure step when
# one names a folder that is neither the layer itself nor one below it, so a
# wrong-way include fails the build (the picture is in DEVELOPERS.md).
#
# usage: tritsim_layer(NAME [BELOW layer...] [EXTRA_SOURCES file...] [LIBS target...])
#   NAME           folder under sim/ and library tritsim_NAME
#   BELOW          the layers NAME may use directly (their own lower layers come along)
#   EXTRA_SOURCES  generated sources to compile into the layer
#   LIBS           third-party targets the layer links
function(tritsim_layer name)
  cmake_parse_arguments(LAYER "" "" "BELOW;EXTRA_SOURCES;LIBS" ${ARGN})
  file(GLOB sources CONFIGURE_DEPENDS ${CMAKE_SOURCE_DIR}/sim/${name}/*.cc)
  file(GLOB headers CONFIGURE_DEPENDS ${CMAKE_SOURCE_DIR}/sim/${name}/*.h)
  list(FILTER sources EXCLUDE REGEX ".*/sim/cli/main\\.cc$")
  set(allowed ${name})
  foreach(below ${LAYER_BELOW})
    get_property(below_allowed GLOBAL PROPERTY TRITSIM_LAYER_${below})
    if(NOT below_allowed)
      message(FATAL_ERROR "layer ${name}: '${below}' is not a layer defined before it")
    endif()
    list(APPEND allowed ${below_allowed})
  endforeach()
  list(REMOVE_DUPLICATES allowed)
  set_property(GLOBAL PROPERTY TRITSIM_LAYER_${name} ${allowed})
  tritsim_check_includes(${name} "${allowed}" ${sources} ${headers})
  add_library(tritsim_${name} STATIC ${sources} ${LAYER_EXTRA_SOURCES})
  target_include_directories(tritsim_${name} PUBLIC ${CMAKE_SOURCE_DIR}/sim)
  target_compile_options(tritsim_${name} PRIVATE ${TRITSIM_WARNINGS})
  list(TRANSFORM LAYER_BELOW PREPEND tritsim_ OUTPUT_VARIABLE below_targets)
  target_link_libraries(tritsim_${name} PUBLIC ${below_targets} ${LAYER_LIBS})
endfunction()

# Stops the configure step when a file of layer `name` includes a project
# header from a folder outside `allowed`.
function(tritsim_check_includes name allowed)
  foreach(file ${ARGN})
    file(STRINGS ${file} includes REGEX "^#include \"[a-z_]+/")
    foreach(line ${includes})
      string(REGEX REPLACE "^#include \"([a-z_]+)/.*" "\\1" folder "${line}")
      if(NOT folder IN_LIST allowed)
        message(FATAL_ERROR "layering: ${file} includes '${folder}/', which is not below "
                            "layer '${name}' (allowed: ${allowed}); see DEVELOPERS.md")
      endif()
    endforeach()
  endforeach()
endfunction()
