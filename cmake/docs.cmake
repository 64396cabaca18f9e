# Made at build time from the program itself, installed with it:
# - a man page per command (cmake/manpages.cmake runs help2man on `rtline COMMAND --help`);
# - bash completion (tools/bash_completion.cpp walks the same CLI11 definition main() parses with).
# Off with -DRTLINE_DOCS=OFF; the man pages also need help2man and gzip (Debian: help2man, gzip).
option(RTLINE_DOCS "Generate man pages (help2man) and bash completion at build time, and install them" ON)
if(NOT RTLINE_DOCS)
  return()
endif()
include(GNUInstallDirs)

add_executable(rtline_completion ${PROJECT_SOURCE_DIR}/tools/bash_completion.cpp)
target_link_libraries(rtline_completion PRIVATE rtline_cli)
target_compile_options(rtline_completion PRIVATE ${RTLINE_WARNINGS})
set(RTLINE_COMPLETION ${PROJECT_BINARY_DIR}/completion/rtline)
add_custom_command(OUTPUT ${RTLINE_COMPLETION}
                   COMMAND ${CMAKE_COMMAND} -E make_directory ${PROJECT_BINARY_DIR}/completion
                   COMMAND rtline_completion ${RTLINE_COMPLETION}
                   DEPENDS rtline_completion
                   COMMENT "Writing bash completion from the CLI definition")
add_custom_target(rtline_bash_completion ALL DEPENDS ${RTLINE_COMPLETION})
install(FILES ${RTLINE_COMPLETION} DESTINATION ${CMAKE_INSTALL_DATADIR}/bash-completion/completions)

find_program(RTLINE_HELP2MAN help2man)
find_program(RTLINE_GZIP gzip)
if(NOT RTLINE_HELP2MAN OR NOT RTLINE_GZIP)
  message(WARNING "help2man or gzip not found: no man pages (Debian: apt install help2man)")
  return()
endif()
set(RTLINE_MAN_DIR ${PROJECT_BINARY_DIR}/man)
add_custom_command(OUTPUT ${RTLINE_MAN_DIR}/rtline.1.gz
                   COMMAND ${CMAKE_COMMAND} -DRTLINE=$<TARGET_FILE:rtline> -DHELP2MAN=${RTLINE_HELP2MAN}
                           -DGZIP=${RTLINE_GZIP} -DVERSION=${PROJECT_VERSION} -DOUT=${RTLINE_MAN_DIR}
                           -P ${CMAKE_CURRENT_LIST_DIR}/manpages.cmake
                   DEPENDS rtline ${CMAKE_CURRENT_LIST_DIR}/manpages.cmake
                   COMMENT "Writing man pages from rtline --help (help2man)")
add_custom_target(rtline_man ALL DEPENDS ${RTLINE_MAN_DIR}/rtline.1.gz)
install(DIRECTORY ${RTLINE_MAN_DIR}/ DESTINATION ${CMAKE_INSTALL_MANDIR}/man1 FILES_MATCHING PATTERN "*.1.gz")

# The pages and the completion against the program they came from (tests/package_check.sh).
if(RTLINE_BUILD_TESTS)
  add_test(NAME package_docs
           COMMAND bash ${PROJECT_SOURCE_DIR}/tests/package_check.sh $<TARGET_FILE:rtline> ${RTLINE_COMPLETION}
                   ${RTLINE_MAN_DIR})
endif()
