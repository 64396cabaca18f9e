# Writes one man page per rtline command, and rtline.1 for the program, from the program's own --help
# with help2man; the commands are the ones `rtline --help` lists, so a new command gets its page with no
# change here. Run by the build (cmake/docs.cmake):
#   cmake -DRTLINE=… -DHELP2MAN=… -DGZIP=… -DVERSION=… -DOUT=… -P manpages.cmake
foreach(var RTLINE HELP2MAN GZIP VERSION OUT)
  if(NOT DEFINED ${var})
    message(FATAL_ERROR "manpages.cmake needs -D${var}=")
  endif()
endforeach()

execute_process(COMMAND ${RTLINE} --help OUTPUT_VARIABLE help RESULT_VARIABLE status)
if(NOT status EQUAL 0)
  message(FATAL_ERROR "rtline --help failed (${status})")
endif()

# The "Subcommands:" block: "  NAME   Description", up to the first blank line.
string(REPLACE "\n" ";" lines "${help}")
set(in_block FALSE)
set(commands "")
foreach(line IN LISTS lines)
  if(line STREQUAL "Subcommands:")
    set(in_block TRUE)
  elseif(in_block AND line MATCHES "^  ([a-z][a-z0-9-]*) +(.+)$")
    list(APPEND commands ${CMAKE_MATCH_1})
    set(description_${CMAKE_MATCH_1} "${CMAKE_MATCH_2}")
  elseif(in_block)
    break()
  endif()
endforeach()
if(NOT commands)
  message(FATAL_ERROR "rtline --help lists no commands")
endif()

file(REMOVE_RECURSE ${OUT})
file(MAKE_DIRECTORY ${OUT})
# SEE ALSO on every page: the program's page and every command's.
set(see_also "\\fBrtline\\fR(1)")
foreach(c IN LISTS commands)
  string(APPEND see_also ", \\fBrtline-${c}\\fR(1)")
endforeach()
file(WRITE ${OUT}/see-also.h2m "[SEE ALSO]\n${see_also}\n")

# help2man reads `rtline <help-option>` and takes the page's name from the version string.
function(write_page page name help_option)
  execute_process(COMMAND ${HELP2MAN} --no-info --section=1 --manual=rtline --source=rtline
                          "--name=${name}" "--help-option=${help_option}" "--version-string=${page} ${VERSION}"
                          --include=${OUT}/see-also.h2m --output=${OUT}/${page}.1 ${RTLINE}
                  RESULT_VARIABLE status)
  if(NOT status EQUAL 0)
    message(FATAL_ERROR "help2man failed on ${page} (${status})")
  endif()
  # Compressed as Debian's policy asks (-n: no name or time stamp inside, so the file is reproducible).
  execute_process(COMMAND ${GZIP} -9nf ${OUT}/${page}.1 RESULT_VARIABLE status)
  if(NOT status EQUAL 0)
    message(FATAL_ERROR "gzip failed on ${page}.1 (${status})")
  endif()
endfunction()

write_page(rtline "design NTC thermistor linearization circuits" --help)
foreach(c IN LISTS commands)
  string(SUBSTRING "${description_${c}}" 0 1 first)
  string(SUBSTRING "${description_${c}}" 1 -1 rest)
  string(TOLOWER "${first}" first)
  write_page(rtline-${c} "${first}${rest}" "${c} --help")
endforeach()
file(REMOVE ${OUT}/see-also.h2m)
