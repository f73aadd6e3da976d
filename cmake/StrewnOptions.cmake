# Warnings and sanitizers shared by every strewn target, through the interface target strewn_options.
add_library(strewn_options INTERFACE)
target_compile_options(strewn_options INTERFACE -Wall -Wextra -Wpedantic -Wshadow -Wconversion
                                                -Wno-sign-conversion)
# strewn never reads errno, so math functions need not set it (sqrt becomes one instruction).
target_compile_options(strewn_options INTERFACE -fno-math-errno)
if(STREWN_WERROR)
  target_compile_options(strewn_options INTERFACE -Werror)
endif()
if(STREWN_FUZZ)
  # Every library instrumented for libFuzzer's coverage, with ASan and UBSan (clang only).
  target_compile_options(strewn_options INTERFACE -fsanitize=fuzzer-no-link,address,undefined
                                                  -fno-omit-frame-pointer -fno-sanitize-recover=all)
  target_link_options(strewn_options INTERFACE -fsanitize=address,undefined)
endif()
if(STREWN_SANITIZE)
  target_compile_options(strewn_options INTERFACE -fsanitize=address,undefined -fno-omit-frame-pointer
                                                  -fno-sanitize-recover=all)
  target_link_options(strewn_options INTERFACE -fsanitize=address,undefined)
endif()

# Declares an engine module: a static library from the .cpp files of its folder, its public headers
# under engine/ (included as "<module>/<header>.hpp"), and the dependencies it names.
function(strewn_module name)
  cmake_parse_arguments(ARG "" "" "DEPENDS" ${ARGN})
  file(GLOB sources CONFIGURE_DEPENDS ${CMAKE_CURRENT_SOURCE_DIR}/*.cpp)
  add_library(strewn_${name} STATIC ${sources})
  target_include_directories(strewn_${name} PUBLIC ${PROJECT_SOURCE_DIR}/engine)
  target_link_libraries(strewn_${name} PUBLIC ${ARG_DEPENDS} PRIVATE strewn_options)
endfunction()
